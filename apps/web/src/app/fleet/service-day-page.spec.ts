import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialog } from '@angular/material/dialog';
import { provideRouter } from '@angular/router';
import type { Role } from '@nightyard/contracts';
import { Clock } from '../core/clock';
import { depotNight, settle } from '../testing/fixtures';
import { DEPOT_ID, bus, run, serviceDay, signedInAs } from './fleet-fixtures';
import { describePath } from './field-paths';
import { csvProblems } from './fleet-format';
import { runInputOf, runRow } from './run-rows';
import { ServiceDayPage, previousWeekday } from './service-day-page';

const DAY = `/api/depots/${DEPOT_ID}/service-days/2026-12-03`;

describe('ServiceDayPage', () => {
  let fixture: ComponentFixture<ServiceDayPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  async function render(roles: Role[]) {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MatDialog, useValue: { open: vi.fn() } },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    await signedInAs(mock, roles);
    fixture = TestBed.createComponent(ServiceDayPage);
    fixture.componentRef.setInput('date', '2026-12-03');
    el = fixture.nativeElement;
    await stable();
    mock.expectOne(DAY).flush(
      serviceDay({
        runs: [
          run({
            id: '00000000-0000-4000-8000-0000000000e1',
            pullOut: '2026-12-03T06:10',
            pullIn: '2026-12-03T08:25',
            arrivalSocPct: null,
            arrivalSocSource: null,
          }),
          run({ id: '00000000-0000-4000-8000-0000000000e2' }),
        ],
      }),
    );
    mock
      .expectOne(`/api/depots/${DEPOT_ID}/buses`)
      .flush({ buses: [bus(), bus({ id: '00000000-0000-4000-8000-0000000000b2', number: '202' })] });
    mock.expectOne(`/api/depots/${DEPOT_ID}/cold-weather`).flush({ bands: [{ belowF: 32, factor: 1.25 }] });
    await settle();
    await stable();
    fixture.detectChanges();
  }

  afterEach(() => mock.verify());

  /** Runs change detection and the resources' loaders; never waits for an unanswered request (whenStable would). */
  async function stable() {
    TestBed.tick();
    await settle();
    TestBed.tick();
    await settle();
  }

  /** Button labels without their icon's ligature. */
  const buttons = () =>
    [...el.querySelectorAll('button')].map((b) =>
      [...b.childNodes]
        .filter((n) => !(n instanceof Element && n.tagName === 'MAT-ICON'))
        .map((n) => n.textContent)
        .join('')
        .replace(/\s+/g, ' ')
        .trim(),
    );

  it('lists every bad line of an uploaded CSV with its line number and column, and keeps the runs', async () => {
    await render(['supervisor']);
    const page = fixture.componentInstance as unknown as { upload(i: { files: File[]; value: string }): Promise<void> };
    const file = new File(
      ['bus,pull_out,pull_in,miles,kwh,arrival_soc_pct\n201,14:05,16:30,30,,120\n999,14:10,16:40,30,,40\n'],
      'runs.csv',
    );
    const uploading = page.upload({ files: [file], value: 'C:\\fakepath\\runs.csv' });
    await settle();
    const req = mock.expectOne(`${DAY}/csv`);
    expect(req.request.method).toBe('POST');
    expect(req.request.body.csv).toContain('999,14:10');
    expect(req.request.body.forecastLowF).toBe(28);
    req.flush(
      {
        error: {
          code: 'validation_failed',
          message: '2 lines need fixing; nothing was saved',
          fields: {
            'line 3.bus': "Bus 999 is not in this depot's fleet",
            'line 2.arrival_soc_pct': 'The state of charge on arrival is 0 to 100 %',
          },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await uploading;
    await stable();
    fixture.detectChanges();
    const list = el.querySelector('ny-problem-summary ul[aria-label="Lines to fix"]');
    const items = [...list!.querySelectorAll('li')].map((li) => li.textContent?.replace(/\s+/g, ' ').trim());
    expect(items).toEqual([
      'Line 2, column arrival_soc_pct: The state of charge on arrival is 0 to 100 %',
      "Line 3, column bus: Bus 999 is not in this depot's fleet",
    ]);
    expect(el.querySelector('ny-problem-summary')?.textContent).toContain(
      'runs.csv: 2 lines need fixing; nothing was saved',
    );
    expect(el.querySelector('ny-problem-summary [aria-live="assertive"]')).not.toBeNull();
    // Nothing was saved: the table still shows the day's two runs.
    expect(el.querySelectorAll('table.runs tbody tr').length).toBe(2);
  });

  it('says a fault of the whole file once (a binary file with a NUL), not again as a line to fix', async () => {
    await render(['supervisor']);
    const page = fixture.componentInstance as unknown as { upload(i: { files: File[]; value: string }): Promise<void> };
    const uploading = page.upload({
      files: [new File(['PK\u0003\u0004\u0000\u0000'], 'runs.xlsx')],
      value: 'runs.xlsx',
    });
    await settle();
    const nul = 'The file contains a NUL character (\\u0000): remove it';
    mock
      .expectOne(`${DAY}/csv`)
      .flush(
        { error: { code: 'validation_failed', message: `Check csv: ${nul}`, fields: { csv: nul } } },
        { status: 400, statusText: 'Bad Request' },
      );
    await uploading;
    await stable();
    fixture.detectChanges();
    const summary = el.querySelector('ny-problem-summary')!.textContent!.replace(/\s+/g, ' ');
    expect(summary).toContain(`runs.xlsx: ${nul}`);
    expect(summary.split('NUL character').length - 1).toBe(1);
  });

  it('lets a supervisor edit: upload, copy, add, save, remove', async () => {
    await render(['supervisor']);
    expect(buttons()).toEqual(
      expect.arrayContaining(['Upload CSV', 'Download template', 'Copy runs', 'Add run', 'Save runs']),
    );
    expect(el.querySelectorAll('tbody mat-select').length).toBe(2);
    expect(el.querySelector('input[aria-label="Runs CSV file"]')).not.toBeNull();
    // The saved sources of the states of charge: estimated (none entered), uploaded.
    const sources = [...el.querySelectorAll('td.source')].map((td) => td.textContent?.replace('SOC source', '').trim());
    expect(sources).toEqual(['Estimated 52.1 %', 'Uploaded']);
  });

  it('shows the runs read-only to finance, without any edit control', async () => {
    await render(['finance']);
    expect(el.textContent).toContain('You can read the runs');
    const labels = buttons();
    for (const hidden of ['Upload CSV', 'Download template', 'Copy runs', 'Add run', 'Save runs', 'Edit factors']) {
      expect(labels.some((l) => l?.includes(hidden))).toBe(false);
    }
    expect(el.querySelector('input[type="file"]')).toBeNull();
    expect(el.querySelectorAll('tbody input, tbody mat-select').length).toBe(0);
    const rows = [...el.querySelectorAll('table.read tbody tr')].map((r) => r.textContent?.replace(/\s+/g, ' ').trim());
    expect(rows).toHaveLength(2);
    expect(rows[0]).toContain('06:10');
    expect(rows[0]).toContain('Estimated');
    expect(rows[1]).toContain('Uploaded');
  });

  it("opens on tonight's service day as the server says, not the depot's calendar date", async () => {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MatDialog, useValue: { open: vi.fn() } },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    // 02:00 on Thursday 3 December at the depot: the night of Wednesday 2 December is under way.
    const now = '2026-12-03T08:00:00.000Z';
    TestBed.inject(Clock).setServerTime(Date.parse(now));
    await signedInAs(mock, ['supervisor']);
    fixture = TestBed.createComponent(ServiceDayPage);
    el = fixture.nativeElement;
    await stable();
    mock.expectNone((r) => r.url.includes('/service-days/'));
    mock.expectOne(`/api/depots/${DEPOT_ID}/night`).flush(depotNight('2026-12-02', now));
    await settle();
    await stable();
    mock
      .expectOne(`/api/depots/${DEPOT_ID}/service-days/2026-12-02`)
      .flush(serviceDay({ date: '2026-12-02', runs: [] }));
    mock.expectOne(`/api/depots/${DEPOT_ID}/buses`).flush({ buses: [bus()] });
    mock.expectOne(`/api/depots/${DEPOT_ID}/cold-weather`).flush({ bands: [] });
    await settle();
    await stable();
    fixture.detectChanges();
    expect(el.querySelector<HTMLInputElement>('input[type="date"]')?.value).toBe('2026-12-02');
    mock.verify();
  });

  it('takes pull-out and pull-in as HH:mm, 24-hour, in text fields', async () => {
    await render(['supervisor']);
    const pullOut = el.querySelector<HTMLInputElement>('input[aria-label="Pull-out, row 1"]')!;
    expect(pullOut.type).toBe('text');
    expect(pullOut.value).toBe('06:10');
    const row = runRow({ busNumber: '201', pullOut: '2026-12-03T14:05', pullIn: '2026-12-04T05:30', miles: 30 });
    row.controls.pullOut.setValue('2:05 PM');
    expect(row.controls.pullOut.errors).toEqual({
      message: 'Write the pull-out time as HH:mm, 24-hour (for example 21:30)',
    });
    row.controls.pullOut.setValue('14:05');
    expect(row.controls.pullOut.errors).toBeNull();
  });
});

describe('service day helpers', () => {
  it('orders CSV problems by line and keeps file-wide ones first', () => {
    expect(csvProblems({ 'line 10.miles': 'b', 'line 2.bus': 'a', file: 'Not valid CSV' })).toEqual([
      { line: null, column: 'file', message: 'Not valid CSV' },
      { line: 2, column: 'bus', message: 'a' },
      { line: 10, column: 'miles', message: 'b' },
    ]);
  });

  it('puts a pull-in earlier than the pull-out on the next morning', () => {
    const row = runRow({ busNumber: '201', pullOut: '2026-12-03T14:05', pullIn: '2026-12-04T05:30', miles: 30 });
    expect(runInputOf(row, '2026-12-03')).toEqual({
      busNumber: '201',
      pullOut: '2026-12-03T14:05',
      pullIn: '2026-12-04T05:30',
      miles: 30,
      kwh: null,
      arrivalSocPct: null,
    });
  });

  it('names a run field the API reports by its row, as the table does', () => {
    expect(describePath('runs[3].pullIn', { pullIn: 'pull-in' })).toBe('Row 4, pull-in');
    expect(describePath('forecastLowF', { forecastLowF: 'Forecast low' })).toBe('Forecast low');
  });

  it('copies from the previous weekday by default', () => {
    expect(previousWeekday('2026-12-07')).toBe('2026-12-04'); // Monday -> Friday
    expect(previousWeekday('2026-12-03')).toBe('2026-12-02');
  });
});
