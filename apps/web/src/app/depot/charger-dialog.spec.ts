import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { Subject } from 'rxjs';
import { settle } from '../testing/fixtures';
import { ChargerDialog, chargerForm, chargerInput, type ChargerDialogData } from './charger-dialog';
import { CABINET_ID, DEPOT_ID, charger, depotDetail } from '../shared/setup-fixtures';

describe('charger form', () => {
  it('asks for a reason only when the charger is out of service', () => {
    const form = chargerForm();
    form.patchValue({ label: 'D3', maxKw: 120 });
    expect(form.valid).toBe(true);
    form.controls.status.setValue('out_of_service');
    form.controls.statusReason.updateValueAndValidity();
    expect(form.controls.statusReason.getError('zod')).toBe('Say why the charger is out of service');
    expect(form.valid).toBe(false);
    form.controls.statusReason.setValue('  ');
    expect(form.valid).toBe(false);
    form.controls.statusReason.setValue('Connector damaged');
    expect(form.valid).toBe(true);
    form.controls.status.setValue('in_service');
    form.controls.statusReason.setValue('');
    expect(form.valid).toBe(true);
  });

  it("checks label and maximum with the API contract's words", () => {
    const form = chargerForm();
    expect(form.controls.label.getError('zod')).toBe('Label the charger');
    form.controls.maxKw.setValue(-5);
    expect(form.controls.maxKw.getError('zod')).toBe("The charger's maximum cannot be negative");
    form.controls.maxKw.setValue(0);
    expect(form.controls.maxKw.getError('zod')).toBe('The maximum must be above 0 kW');
  });

  it('sends no reason for a charger in service', () => {
    const form = chargerForm(charger({ label: 'C1', status: 'out_of_service', statusReason: 'Old reason' }));
    form.controls.status.setValue('in_service');
    expect(chargerInput(form)).toEqual({
      label: 'C1',
      maxKw: 60,
      connector: 'SAE J1772 CCS1',
      cabinetId: null,
      status: 'in_service',
      statusReason: null,
      outFrom: null,
      outUntil: null,
    });
  });
});

describe('ChargerDialog', () => {
  let fixture: ComponentFixture<ChargerDialog>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const close = vi.fn();
  let keys = new Subject<KeyboardEvent>();
  const detail = depotDetail();

  beforeEach(async () => {
    close.mockReset();
    keys = new Subject<KeyboardEvent>();
    const data: ChargerDialogData = { depotId: DEPOT_ID, cabinets: detail.cabinets, chargers: detail.chargers };
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        {
          provide: MatDialogRef,
          useValue: { close, keydownEvents: () => keys, backdropClick: () => new Subject<MouseEvent>() },
        },
        { provide: MAT_DIALOG_DATA, useValue: data },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(ChargerDialog);
    el = fixture.nativeElement;
    await fixture.whenStable();
  });

  afterEach(() => mock.verify());

  function input(label: string): HTMLInputElement | HTMLTextAreaElement {
    const l = [...el.querySelectorAll('label')].find((x) => x.textContent?.trim().replace(/\s*\*$/, '') === label)!;
    return el.querySelector<HTMLInputElement>(`#${l.getAttribute('for')}`)!;
  }

  function type(field: HTMLInputElement | HTMLTextAreaElement, value: string) {
    field.value = value;
    field.dispatchEvent(new Event('input'));
    field.dispatchEvent(new Event('blur'));
  }

  async function save() {
    [...el.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Save charger')!.click();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  function radio(label: string) {
    return [...el.querySelectorAll('mat-radio-button')]
      .find((r) => r.textContent?.trim() === label)!
      .querySelector('input')!;
  }

  it('refuses to save an out-of-service charger without a reason', async () => {
    type(input('Label'), 'D3');
    type(input('Maximum power'), '120');
    radio('Out of service').click();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.textContent).toContain('Plans leave this charger out for any night its period touches.');
    await save();
    expect(el.textContent).toContain('Say why the charger is out of service');
    mock.expectNone(`/api/depots/${DEPOT_ID}/chargers`);

    type(input('Reason it is out of service'), 'Cable damaged');
    await save();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/chargers`);
    expect(req.request.body).toMatchObject({
      label: 'D3',
      maxKw: 120,
      status: 'out_of_service',
      statusReason: 'Cable damaged',
    });
    req.flush({ charger: charger({ label: 'D3' }) }, { status: 201, statusText: 'Created' });
    await settle();
    expect(close).toHaveBeenCalled();
  });

  it('questions a charger above the service, and sets its OCPP identity and password after saving', async () => {
    // The dialog opened from a depot with a 450 kW service.
    (fixture.componentInstance as unknown as { data: ChargerDialogData }).data.serviceLimitKw = 450;
    type(input('Label'), 'D4');
    type(input('Maximum power'), '5000');
    type(input('OCPP identity'), 'OLD-D4');
    await save();
    expect(el.textContent).toContain("is above the depot's 450 kW service");
    expect(el.textContent).toContain('Enter the password the charger will use');
    mock.expectNone(`/api/depots/${DEPOT_ID}/chargers`);
    type(input('OCPP password'), 'a-long-charger-secret');
    el.querySelector<HTMLInputElement>('ny-plausible-confirm input[type="checkbox"]')!.click();
    await fixture.whenStable();
    await save();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/chargers`);
    expect(req.request.body).toMatchObject({ label: 'D4', maxKw: 5000 });
    const saved = charger({ label: 'D4', maxKw: 5000 });
    req.flush({ charger: saved }, { status: 201, statusText: 'Created' });
    await settle();
    const ocpp = mock.expectOne(`/api/depots/${DEPOT_ID}/chargers/${saved.id}/ocpp`);
    expect(ocpp.request.method).toBe('PUT');
    expect(ocpp.request.body).toEqual({ identity: 'OLD-D4', password: 'a-long-charger-secret' });
    ocpp.flush(null, { status: 204, statusText: 'No Content' });
    await settle();
    expect(close).toHaveBeenCalledWith({ ...saved, ocppIdentity: 'OLD-D4' });
  });

  it('gives a maximum the contract refuses its error only, with no offer to confirm it as right', async () => {
    (fixture.componentInstance as unknown as { data: ChargerDialogData }).data.serviceLimitKw = 450;
    type(input('Label'), 'D4');
    type(input('Maximum power'), '99999999');
    await save();
    expect(el.textContent).toContain('100,000 kW');
    expect(el.querySelector('ny-plausible-confirm input[type="checkbox"]')).toBeNull();
    mock.expectNone(`/api/depots/${DEPOT_ID}/chargers`);
  });

  it("shows the API's cabinet error on the cabinet field", async () => {
    type(input('Label'), 'D3');
    type(input('Maximum power'), '120');
    (fixture.componentInstance as unknown as { form: ReturnType<typeof chargerForm> }).form.controls.cabinetId.setValue(
      CABINET_ID,
    );
    await save();
    mock.expectOne(`/api/depots/${DEPOT_ID}/chargers`).flush(
      {
        error: {
          code: 'validation_failed',
          message: 'That power cabinet is not in this depot',
          fields: { cabinetId: 'Choose a cabinet of this depot' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    const cabinetField = [...el.querySelectorAll('mat-form-field')].find((f) =>
      f.textContent?.includes('Power cabinet'),
    )!;
    expect(cabinetField.querySelector('mat-error')?.textContent?.trim()).toBe('Choose a cabinet of this depot');
    expect(el.querySelector('[aria-live="assertive"]')?.textContent).toContain(
      'That power cabinet is not in this depot',
    );
    expect(close).not.toHaveBeenCalled();
  });
});
