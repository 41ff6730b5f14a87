import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { settle } from '../testing/fixtures';
import { importResult } from './costs-fixtures';
import { MeterImportPanel, whereText } from './meter-import-panel';

describe('MeterImportPanel', () => {
  let fixture: ComponentFixture<MeterImportPanel>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  let imported: unknown[];

  beforeEach(async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    mock = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(MeterImportPanel);
    fixture.componentRef.setInput('depotId', 'd1');
    fixture.componentRef.setInput('periodStart', '2026-12-01');
    fixture.componentRef.setInput('periodName', 'December 2026');
    imported = [];
    fixture.componentInstance.imported.subscribe((r) => imported.push(r));
    el = fixture.nativeElement;
    await refresh();
  });

  afterEach(() => mock.verify());

  async function refresh() {
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  async function choose(name: string, text: string) {
    const input = el.querySelector<HTMLInputElement>('input[type="file"]')!;
    Object.defineProperty(input, 'files', {
      value: [new File([text], name, { type: 'text/csv' })],
      configurable: true,
    });
    input.dispatchEvent(new Event('change'));
  }

  /** Reading the file is asynchronous: waits for the import request. */
  async function nextRequest() {
    for (let i = 0; i < 50; i++) {
      const found = mock.match('/api/depots/d1/meter-data');
      if (found.length) return found[0]!;
      await new Promise((r) => setTimeout(r, 5));
    }
    throw new Error('No import request was sent');
  }

  const text = (e: Element | null) => e?.textContent?.replace(/\s+/g, ' ').trim() ?? '';

  it('has a labelled file input that takes Green Button XML and CSV', () => {
    const input = el.querySelector<HTMLInputElement>('input[type="file"]')!;
    expect(input.accept).toContain('.xml');
    expect(input.accept).toContain('.csv');
    expect(text(el.querySelector(`label[for="${input.id}"]`))).toContain('Meter data file (Green Button XML or CSV)');
  });

  it('sends the file for the billing period and shows the intervals, duplicates and gaps', async () => {
    await choose('usage.csv', 'TYPE,DATE,START TIME,END TIME,USAGE,UNITS\n');
    const req = await nextRequest();
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({
      fileName: 'usage.csv',
      content: 'TYPE,DATE,START TIME,END TIME,USAGE,UNITS\n',
      billingPeriodStart: '2026-12-01',
    });
    req.flush(importResult(), { status: 201, statusText: 'Created' });
    await refresh();
    const result = el.querySelector('.result.ok')!;
    expect(text(result)).toContain(
      'usage.csv imported: 8 intervals of 15 minutes (Green Button CSV), 82.3 kWh in all.',
    );
    expect(text(result)).toContain('2 duplicate readings with the same value, counted once.');
    expect(text(result)).toContain('1 gap in the readings');
    const gaps = [...result.querySelectorAll('ul.gaps li')].map(text);
    expect(gaps).toHaveLength(1);
    expect(gaps[0]).toMatch(/Dec.* 22:30 to 23:00$/);
    expect(text(result)).toContain('Peaks so far in the billing period now: facility 185 kW, on-peak 48 kW.');
    expect(imported).toHaveLength(1);
  });

  it('shows the API message and what to fix, and says nothing was imported', async () => {
    await choose('other-month.xml', '<feed/>');
    (await nextRequest()).flush(
      {
        error: {
          code: 'validation_failed',
          message:
            '8 readings lie outside the billing period 2026-12-01 00:00 to 2027-01-01 00:00, e.g. 2026-10-02 22:00',
          fields: { intervals: 'Outside the billing period' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await refresh();
    const problem = el.querySelector('.result.problem')!;
    expect(text(problem)).toContain(
      'other-month.xml was not imported. 8 readings lie outside the billing period 2026-12-01 00:00',
    );
    expect(text(problem)).toContain('Choose the billing period the file is for, or export December 2026 only.');
    expect(text(problem)).toMatch(/Nothing was imported\.$/);
    expect(problem.querySelectorAll('li')).toHaveLength(0);
    expect(el.querySelector('.result.ok')).toBeNull();
    expect(imported).toHaveLength(0);
  });

  it('names the lines to fix from the API fields', async () => {
    await choose('bad.csv', 'x');
    (await nextRequest()).flush(
      {
        error: {
          code: 'validation_failed',
          message: 'Some lines are not valid; nothing was imported',
          fields: { 'line 7.UNITS': 'Unit "therm" is not supported: kWh or Wh' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await refresh();
    expect([...el.querySelectorAll('.result.problem li')].map(text)).toEqual([
      'Line 7, UNITS: Unit "therm" is not supported: kWh or Wh',
    ]);
    // The API's message already says nothing was imported: not twice.
    expect(text(el.querySelector('.result.problem .headline'))).toBe(
      'bad.csv was not imported. Some lines are not valid; nothing was imported.',
    );
  });

  it('keeps the API\'s question mark: no "export?."', async () => {
    await choose('notes.xml', '<feed/>');
    (await nextRequest()).flush(
      {
        error: {
          code: 'validation_failed',
          message: 'No IntervalBlock in the file: is it a Green Button usage export?',
          fields: { IntervalBlock: 'Missing' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await refresh();
    expect(text(el.querySelector('.result.problem .headline'))).toBe(
      'notes.xml was not imported. No IntervalBlock in the file: is it a Green Button usage export? Nothing was imported.',
    );
  });

  it('refuses a file that is neither XML nor CSV without sending it', async () => {
    await choose('bill.pdf', '%PDF');
    await refresh();
    expect(text(el.querySelector('.result.problem'))).toContain(
      'bill.pdf was not imported: choose a Green Button XML (.xml) or CSV (.csv) file.',
    );
    mock.expectNone('/api/depots/d1/meter-data');
  });

  it('words the API field keys', () => {
    expect(whereText('line 12.UNITS')).toBe('Line 12, UNITS');
    expect(whereText('IntervalReading[3].value')).toBe('Reading 3, value');
    expect(whereText('2026-12-02 22:00')).toBe('Interval starting 2026-12-02 22:00');
  });
});
