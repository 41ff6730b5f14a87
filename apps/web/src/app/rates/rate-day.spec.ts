import { ComponentFixture, TestBed } from '@angular/core/testing';
import type { RatePreview } from '@nightyard/contracts';
import { fallBackPreview, weekdayPreview } from '../shared/setup-fixtures';
import { previewHours } from './preview-hours';
import { RateDay } from './rate-day';

describe('RateDay', () => {
  let fixture: ComponentFixture<RateDay>;
  let el: HTMLElement;

  async function render(preview: RatePreview, timezone = 'America/Chicago') {
    fixture = TestBed.createComponent(RateDay);
    fixture.componentRef.setInput('preview', preview);
    fixture.componentRef.setInput('timezone', timezone);
    el = fixture.nativeElement;
    await fixture.whenStable();
    fixture.detectChanges();
  }

  const rows = () =>
    [...el.querySelectorAll('table.hours tbody tr')].map((tr) =>
      [...tr.children].map((c) => c.textContent?.replace(/\s+/g, ' ').trim()),
    );

  it('shows the price of each of the 24 hours of a normal day', async () => {
    await render(weekdayPreview());
    const r = rows();
    expect(r).toHaveLength(24);
    // The facility demand charge applies at every hour, the on-peak one on top inside its window.
    expect(r[0]).toEqual(['00:00–01:00', 'off-peak', '$0.068', '$7.50 facility']);
    expect(r[7]).toEqual(['07:00–08:00', 'mid-peak', '$0.11', '$7.50 facility']);
    expect(r[16]).toEqual(['16:00–17:00', 'on-peak', '$0.18', '$7.50 facility + $9.00 on-peak']);
    expect(r[23]).toEqual(['23:00–24:00', 'off-peak', '$0.068', '$7.50 facility']);
    expect(el.querySelector('table.hours thead')?.textContent).toContain('Price per kWh');
    expect(el.querySelectorAll('table.hours tbody th[scope="row"]')).toHaveLength(24);
  });

  it('shows 25 hours on the day the clocks go back (1 November 2026, America/Chicago)', async () => {
    await render(fallBackPreview());
    const r = rows();
    expect(r).toHaveLength(25);
    expect(r.map((x) => x[0]).slice(0, 4)).toEqual([
      '00:00–01:00',
      '01:00–02:00 CDT',
      '01:00–02:00 CST',
      '02:00–03:00',
    ]);
    expect(r[24]![0]).toBe('23:00–24:00');
    expect(el.textContent).toContain('25 hours');
  });

  it('describes the chart in words and ties it to the canvas', async () => {
    await render(weekdayPreview());
    const canvas = el.querySelector('canvas')!;
    expect(canvas.getAttribute('role')).toBe('img');
    expect(canvas.getAttribute('aria-label')).toContain('price per kWh for each hour');
    const summary = el.querySelector(`#${canvas.getAttribute('aria-describedby')}`)!;
    expect(summary.textContent).toContain('on-peak $0.18 per kWh from 16:00 to 20:00');
    expect(summary.textContent).toContain('on-peak $9.00 per kW from 16:00 to 20:00');
    expect(summary.textContent).toContain('facility $7.50 per kW');
  });

  it('has 23 hours on the day the clocks go forward, and splits an hour priced two ways', () => {
    const spring: RatePreview = {
      ...weekdayPreview(),
      date: '2027-03-14',
      intervals: [
        {
          start: '2027-03-14T00:00:00.000-06:00',
          end: '2027-03-14T16:30:00.000-05:00',
          period: 'off-peak',
          price: 0.07,
          demandCharge: 0,
        },
        {
          start: '2027-03-14T16:30:00.000-05:00',
          end: '2027-03-15T00:00:00.000-05:00',
          period: 'on-peak',
          price: 0.2,
          demandCharge: 0,
        },
      ],
    };
    const hours = previewHours(spring, 'America/Chicago');
    expect(hours).toHaveLength(23);
    expect(hours[1]!.label).toBe('01:00–03:00');
    const split = hours.find((h) => h.label.startsWith('16:00'))!;
    expect(split.parts.map((p) => [p.period, p.from, p.minutes])).toEqual([
      ['off-peak', '16:00', 30],
      ['on-peak', '16:30', 30],
    ]);
  });
});
