import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { settle } from '../testing/fixtures';
import { ReportDialog, type ReportDialogData } from './report-dialog';
import { DEPOT_ID, PLAN_ID, ZONE, at } from './yard-fixtures';

describe('ReportDialog', () => {
  let fixture: ComponentFixture<ReportDialog>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const close = vi.fn();

  async function open(preset: ReportDialogData['preset'] = {}, extra: Partial<ReportDialogData> = {}): Promise<void> {
    close.mockReset();
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MatDialogRef, useValue: { close } },
        {
          provide: MAT_DIALOG_DATA,
          useValue: {
            depotId: DEPOT_ID,
            planId: PLAN_ID,
            timezone: ZONE,
            now: Date.parse(at('22:30')),
            buses: ['201', '202', '203'],
            chargers: ['C1', 'C2'],
            preset,
            ...extra,
          } satisfies ReportDialogData,
        },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(ReportDialog);
    el = fixture.nativeElement;
    await render();
  }

  async function render(): Promise<void> {
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  const form = () => (fixture.componentInstance as unknown as { form: ReportDialog['form'] }).form;
  const submit = async () => {
    el.querySelector('form')!.dispatchEvent(new Event('submit'));
    await render();
  };
  const errors = () => [...el.querySelectorAll('mat-error')].map((e) => e.textContent?.trim());

  afterEach(() => mock.verify());

  it("refuses a state of charge above 100 % with the contract's message and sends nothing", async () => {
    await open({ kind: 'soc_reading', bus: '202' });
    form().controls.socPct.setValue(120);
    await submit();
    expect(errors()).toContain('A state of charge is 0 to 100 %');
    mock.expectNone(`/api/depots/${DEPOT_ID}/tonight/reports`);
  });

  it('needs a reason for a charger out of service', async () => {
    await open({ kind: 'charger_out', charger: 'C2' });
    await submit();
    expect(errors()).toContain('Say what is wrong with the charger');
    mock.expectNone(`/api/depots/${DEPOT_ID}/tonight/reports`);
  });

  it('sends a charger report, shows progress, then the new version and what moved', async () => {
    await open({ kind: 'charger_out', charger: 'C2' });
    form().controls.reason.setValue('  Cable damaged ');
    await submit();
    expect(el.textContent).toContain('Re-planning the rest of the night');
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/tonight/reports`);
    expect(req.request.body).toEqual({ planId: PLAN_ID, kind: 'charger_out', charger: 'C2', reason: 'Cable damaged' });
    req.flush(
      {
        revision: { id: 'r', version: 2, publishedAt: at('22:31'), shortBuses: 0 },
        moved: [{ bus: '203', before: 'C2 22:00-05:00', after: 'C1 23:00-04:00' }],
        replanMs: 840,
        notified: 3,
        effect: {
          costBefore: 73.01,
          costAfter: 644.3,
          demandBefore: 0,
          demandAfter: 571.3,
          peakBeforeKw: 185,
          peakAfterKw: 261.2,
          short: [],
          lines: [
            "The night's projected cost is $571.29 higher: $644.30, was $73.01 (demand charge $0.00 before, $571.30 now; peak 185 kW before, 261.2 kW now).",
          ],
        },
      },
      { status: 201, statusText: 'Created' },
    );
    await render();
    expect(el.textContent).toContain('Version 2 is published');
    // The money the report costs is said where it is made, not only in the supervisor's e-mail.
    expect(el.querySelector('[data-fact="cost-effect"] span')?.textContent?.replace(/\s+/g, ' ').trim()).toBe(
      "The night's projected cost is $571.29 higher: $644.30, was $73.01 (demand charge $0.00 before, $571.30 now; peak 185 kW before, 261.2 kW now). The supervisor has it in the e-mail.",
    );
    expect(el.textContent).toContain('Bus 203: C2 22:00-05:00 → C1 23:00-04:00');
    expect(el.textContent).toContain('3 people were told by e-mail');
  });

  it('past midnight, a late bus time earlier than now has passed: not tomorrow', async () => {
    await open({ kind: 'bus_late', bus: '203' }, { now: Date.parse(at('05:05')) });
    expect(el.textContent).toContain('Depot time, later than now');
    form().controls.expectedTime.setValue('04:00');
    await render();
    expect(el.textContent).toContain('04:00 has passed: give a time later than now');
    expect(el.textContent).not.toContain('Tomorrow');
    form().controls.expectedTime.setValue('05:40');
    await render();
    expect(el.textContent).toContain('Today, 05:40 at the depot');
  });

  it("sends a late bus with its new local time and shows the API's field messages", async () => {
    await open({ kind: 'bus_late', bus: '203' });
    form().controls.expectedTime.setValue('01:10');
    await render();
    expect(el.textContent).toContain('Tomorrow, 01:10 at the depot');
    await submit();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/tonight/reports`);
    expect(req.request.body).toEqual({ planId: PLAN_ID, kind: 'bus_late', bus: '203', expectedAt: '2026-12-02T01:10' });
    req.flush(
      {
        error: {
          code: 'validation_failed',
          message: "Bus 203 is not in tonight's plan for North Depot",
          fields: { bus: "Not in tonight's plan" },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    const scrolled = vi.fn();
    Element.prototype.scrollIntoView = scrolled;
    await render();
    expect(errors()).toContain("Not in tonight's plan");
    expect(el.textContent).toContain("Bus 203 is not in tonight's plan for North Depot");
    expect(el.textContent).toContain('Nothing was changed');
    // Brought into view: on a phone the message sits below the form.
    expect(scrolled.mock.contexts).toContain(el.querySelector('.problem'));
    delete (Element.prototype as Partial<Element>).scrollIntoView;
  });

  it('takes the late bus time as HH:mm, 24-hour: a 12-hour time is refused, digits become HH:mm', async () => {
    await open({ kind: 'bus_late', bus: '203' });
    const input = el.querySelector<HTMLInputElement>('input[formcontrolname="expectedTime"]')!;
    expect(input.type).toBe('text');
    input.value = '11:40 PM';
    input.dispatchEvent(new Event('input'));
    input.dispatchEvent(new Event('blur'));
    await submit();
    expect(errors()).toContain('Write the time as HH:mm, 24-hour (for example 21:30)');
    mock.expectNone(`/api/depots/${DEPOT_ID}/tonight/reports`);
    input.value = '2340';
    input.dispatchEvent(new Event('input'));
    input.dispatchEvent(new Event('blur'));
    await render();
    expect(input.value).toBe('23:40');
    expect(el.textContent).toContain('Today, 23:40 at the depot');
    await submit();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/tonight/reports`);
    expect(req.request.body).toMatchObject({ kind: 'bus_late', expectedAt: '2026-12-01T23:40' });
  });

  it('says so when the plan was revised meanwhile and offers a reload', async () => {
    await open({ kind: 'bus_absent', bus: '201' });
    await submit();
    mock.expectOne(`/api/depots/${DEPOT_ID}/tonight/reports`).flush(
      {
        error: {
          code: 'conflict',
          message: 'The plan was revised meanwhile (version 3): reload and report again if still needed',
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await render();
    expect(el.textContent).toContain('The plan was revised meanwhile (version 3)');
    const reload = [...el.querySelectorAll('button')].find((b) => b.textContent?.includes('Reload the plan'))!;
    reload.click();
    expect(close).toHaveBeenCalledWith({ reload: true });
  });

  it('explains that the night cannot be re-planned before it starts', async () => {
    await open(
      { kind: 'charger_out', charger: 'C1', reason: 'Cable cut' },
      { now: Date.parse(at('17:00')), nightStart: Date.parse(at('18:00')) },
    );
    await submit();
    mock.expectOne(`/api/depots/${DEPOT_ID}/tonight/reports`).flush(
      {
        error: {
          code: 'validation_failed',
          message: "The report does not fit tonight's plan",
          fields: { now: 'must be inside the horizon' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await render();
    expect(el.textContent).toContain('The night has not started yet (it starts Tue, Dec 1 at 18:00)');
    expect(el.textContent).not.toContain('must be inside the horizon');
  });
});
