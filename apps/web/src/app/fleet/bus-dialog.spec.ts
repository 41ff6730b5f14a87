import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialog, MatDialogRef } from '@angular/material/dialog';
import { Subject, of } from 'rxjs';
import { settle } from '../testing/fixtures';
import { BusDialog, type BusDialogData } from './bus-dialog';
import { DEPOT_ID, bus } from './fleet-fixtures';

describe('BusDialog', () => {
  let fixture: ComponentFixture<BusDialog>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const close = vi.fn();
  let keys = new Subject<KeyboardEvent>();

  async function open(data: Partial<BusDialogData> = {}) {
    close.mockReset();
    keys = new Subject<KeyboardEvent>();
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        {
          provide: MatDialogRef,
          useValue: { close, keydownEvents: () => keys, backdropClick: () => new Subject<MouseEvent>() },
        },
        { provide: MAT_DIALOG_DATA, useValue: { depotId: DEPOT_ID, bus: null, connectors: [], ...data } },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(BusDialog);
    el = fixture.nativeElement;
    await fixture.whenStable();
  }

  afterEach(() => mock.verify());

  function input(label: string): HTMLInputElement {
    const labelEl = [...el.querySelectorAll('label')].find(
      (l) => l.textContent?.trim().replace(/\s*\*$/, '') === label,
    );
    return el.querySelector<HTMLInputElement>(`#${labelEl!.getAttribute('for')}`)!;
  }

  function type(field: HTMLInputElement, value: string): void {
    field.value = value;
    field.dispatchEvent(new Event('input'));
    field.dispatchEvent(new Event('blur'));
  }

  async function submit(name: string): Promise<void> {
    [...el.querySelectorAll('button')].find((b) => b.textContent?.trim() === name)!.click();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  const errors = () => [...el.querySelectorAll('mat-error')].map((e) => e.textContent?.trim());

  it('says what is missing before sending anything', async () => {
    await open();
    await submit('Add bus');
    expect(errors()).toEqual([
      'Enter the bus number',
      'Enter the usable energy in kWh',
      'Enter the maximum charge power in kW',
      'Choose the connector standard',
      'Enter the consumption in kWh per mile',
    ]);
    mock.expectNone(`/api/depots/${DEPOT_ID}/buses`);
  });

  it('checks ranges and that the reserve stays below the ceiling', async () => {
    await open();
    type(input('Bus number'), '230');
    type(input('Usable battery energy'), '0');
    type(input('Maximum charge power'), '5000');
    type(input('Connector standard'), 'SAE J1772 CCS1');
    type(input('Consumption'), '1.3');
    type(input('Departure ceiling'), '80');
    type(input('Reserve'), '85');
    type(input('Taper from'), '100');
    await submit('Add bus');
    expect(errors()).toEqual([
      'The usable energy must be above 0',
      'The maximum charge power looks too large (at most 2000)',
      'The reserve must be below the departure ceiling',
      'Taper from must be below 100 % state of charge',
    ]);
    mock.expectNone(`/api/depots/${DEPOT_ID}/buses`);
  });

  it('questions an unlikely consumption and saves it only once confirmed', async () => {
    await open();
    type(input('Bus number'), '231');
    type(input('Usable battery energy'), '196');
    type(input('Maximum charge power'), '80');
    type(input('Connector standard'), 'SAE J1772 CCS1');
    type(input('Consumption'), '15');
    fixture.detectChanges();
    expect(el.textContent).toContain('15 kWh per mile is more than a bus uses');
    await submit('Add bus');
    mock.expectNone(`/api/depots/${DEPOT_ID}/buses`);
    expect(el.textContent).toContain('Confirm the figure, or correct it, to save.');
    el.querySelector<HTMLInputElement>('ny-plausible-confirm input[type="checkbox"]')!.click();
    await fixture.whenStable();
    await submit('Add bus');
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/buses`);
    expect(req.request.body.kwhPerMile).toBe(15);
    req.flush({ bus: bus({ number: '231' }) }, { status: 201, statusText: 'Created' });
    await settle();
  });

  it('closes on Esc without edits, and asks first when there are edits', async () => {
    await open();
    const ask = vi
      .spyOn(fixture.debugElement.injector.get(MatDialog), 'open')
      .mockReturnValue({ afterClosed: () => of(false) } as never);
    keys.next(new KeyboardEvent('keydown', { key: 'Escape' }));
    await settle();
    expect(ask).not.toHaveBeenCalled();
    expect(close).toHaveBeenCalledTimes(1);
    close.mockReset();
    type(input('Bus number'), '232');
    keys.next(new KeyboardEvent('keydown', { key: 'Escape' }));
    await settle();
    expect(ask).toHaveBeenCalledTimes(1);
    expect(close).not.toHaveBeenCalled();
  });

  it('adds a valid bus and closes with it', async () => {
    await open();
    type(input('Bus number'), ' 230 ');
    type(input('Usable battery energy'), '196');
    type(input('Maximum charge power'), '80');
    type(input('Connector standard'), 'SAE J1772 CCS1');
    type(input('Consumption'), '1.28');
    await submit('Add bus');
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/buses`);
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({
      number: '230',
      status: 'active',
      usableKwh: 196,
      maxChargeKw: 80,
      connector: 'SAE J1772 CCS1',
      kwhPerMile: 1.28,
      ceilingPct: 90,
      reservePct: 15,
      taperStartPct: null,
    });
    const saved = bus({ number: '230', taperStartPct: null });
    req.flush({ bus: saved }, { status: 201, statusText: 'Created' });
    await settle();
    expect(close).toHaveBeenCalledWith(saved);
  });

  it('changes an existing bus with PUT and shows the API field message on its field', async () => {
    const existing = bus();
    await open({ bus: existing });
    expect(input('Bus number').value).toBe('201');
    await submit('Save bus');
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/buses/${existing.id}`);
    expect(req.request.method).toBe('PUT');
    req.flush(
      {
        error: {
          code: 'conflict',
          message: 'Another bus has that number',
          fields: { number: 'Bus 201 already exists' },
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(errors()).toEqual(['Bus 201 already exists']);
    expect(close).not.toHaveBeenCalled();
  });
});
