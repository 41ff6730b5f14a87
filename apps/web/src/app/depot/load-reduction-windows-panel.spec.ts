import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { DEPOT_ID, depotDetail } from '../shared/setup-fixtures';
import { settle } from '../testing/fixtures';
import { LoadReductionWindowsPanel } from './load-reduction-windows-panel';

describe('LoadReductionWindowsPanel', () => {
  let fixture: ComponentFixture<LoadReductionWindowsPanel>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  beforeEach(async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    mock = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(LoadReductionWindowsPanel);
    fixture.componentRef.setInput('depotId', DEPOT_ID);
    fixture.componentRef.setInput('windows', depotDetail().loadReductionWindows);
    fixture.componentRef.setInput('serviceLimitKw', 450);
    fixture.componentRef.setInput('canEdit', true);
    el = fixture.nativeElement;
    await refresh();
  });

  afterEach(() => mock.verify());

  async function refresh() {
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  function button(text: string): HTMLButtonElement {
    return [...el.querySelectorAll('button')].find((b) => b.textContent?.replace(/\s+/g, ' ').trim().endsWith(text))!;
  }

  function field(row: Element, label: string): HTMLInputElement {
    const l = [...row.querySelectorAll('label')].find((x) => x.textContent?.trim() === label)!;
    return el.querySelector<HTMLInputElement>(`#${l.getAttribute('for')}`)!;
  }

  function type(input: HTMLInputElement, value: string) {
    input.value = value;
    input.dispatchEvent(new Event('input'));
    input.dispatchEvent(new Event('blur'));
  }

  /** Types a local date-time into a window's date and 24-hour time fields. */
  function typeWhen(row: Element, label: 'Start' | 'End', local: string) {
    const [date, time] = local.split('T') as [string, string];
    type(field(row, `${label} date`), date);
    type(field(row, `${label} time`), time);
  }

  const rows = () => [...el.querySelectorAll('fieldset.window-row')];
  const errorsOf = (row: Element) => [...row.querySelectorAll('mat-error')].map((e) => e.textContent?.trim());

  it('shows the windows read-only until Edit, then saves them all at once', async () => {
    expect(el.textContent).toContain('Utility event');
    button('Edit windows').click();
    await refresh();
    button('Add a window').click();
    await refresh();
    typeWhen(rows()[1]!, 'Start', '2026-12-11T16:00');
    typeWhen(rows()[1]!, 'End', '2026-12-11T18:00');
    type(field(rows()[1]!, 'Reduced limit'), '250');
    button('Save windows').click();
    await refresh();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/load-reduction-windows`);
    expect(req.request.method).toBe('PUT');
    expect(req.request.body).toEqual({
      windows: [
        { start: '2026-12-10T16:00', end: '2026-12-10T19:00', limitKw: 300, note: 'Utility event' },
        { start: '2026-12-11T16:00', end: '2026-12-11T18:00', limitKw: 250, note: '' },
      ],
    });
    // The API names rows by index ("[1].start"): the message lands on that row's field.
    req.flush(
      {
        error: {
          code: 'validation_failed',
          message: 'Check the load-reduction windows',
          fields: { '[1].start': 'Overlaps the window starting 2026-12-11T15:00' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await refresh();
    expect(errorsOf(rows()[1]!)).toEqual(['Overlaps the window starting 2026-12-11T15:00']);
    expect(errorsOf(rows()[0]!)).toEqual([]);
    expect(el.querySelector('[aria-live="assertive"]')?.textContent).toContain(
      'Check the load-reduction windows. Nothing was saved.',
    );
  });

  it('refuses overlaps and limits above the service limit before sending, naming the row', async () => {
    button('Edit windows').click();
    await refresh();
    button('Add a window').click();
    await refresh();
    typeWhen(rows()[1]!, 'Start', '2026-12-10T18:00');
    typeWhen(rows()[1]!, 'End', '2026-12-10T20:00');
    type(field(rows()[1]!, 'Reduced limit'), '500');
    button('Save windows').click();
    await refresh();
    mock.expectNone(`/api/depots/${DEPOT_ID}/load-reduction-windows`);
    expect(errorsOf(rows()[1]!)).toEqual([
      'Overlaps the window starting 2026-12-10T16:00',
      'Above the service limit (450 kW): a reduced limit must be lower',
    ]);
  });

  it('takes times as HH:mm, 24-hour, and says how to write them', async () => {
    button('Edit windows').click();
    await refresh();
    const row = rows()[0]!;
    expect(field(row, 'Start date').value).toBe('2026-12-10');
    expect(field(row, 'Start time').value).toBe('16:00');
    expect(field(row, 'Start time').type).toBe('text');
    type(field(row, 'End time'), '7 PM');
    await refresh();
    expect(errorsOf(row)).toEqual(['Write the time as HH:mm, 24-hour (for example 21:30)']);
    type(field(row, 'End time'), '1930');
    await refresh();
    expect(field(row, 'End time').value).toBe('19:30');
    expect(errorsOf(row)).toEqual([]);
    button('Save windows').click();
    await refresh();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/load-reduction-windows`);
    expect(req.request.body.windows[0]).toMatchObject({ start: '2026-12-10T16:00', end: '2026-12-10T19:30' });
    req.flush({ windows: [] });
    await refresh();
  });
});
