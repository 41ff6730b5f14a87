import { TestBed } from '@angular/core/testing';
import { ChargerTimeline } from './charger-timeline';
import { planResult } from './plan-fixtures';

describe('ChargerTimeline', () => {
  async function render(
    chargers: { id: string; maxKw: number; out?: boolean }[] = [
      { id: 'C2', maxKw: 30 },
      { id: 'C10', maxKw: 120 },
      { id: 'C1', maxKw: 60 },
    ],
  ) {
    const fixture = TestBed.createComponent(ChargerTimeline);
    fixture.componentRef.setInput('result', planResult());
    fixture.componentRef.setInput('timezone', 'America/Chicago');
    fixture.componentRef.setInput('chargers', chargers);
    await fixture.whenStable();
    fixture.detectChanges();
    return fixture.nativeElement as HTMLElement;
  }

  it('draws one row per charger, idle ones too, in charger order', async () => {
    const el = await render();
    expect([...el.querySelectorAll('.label .charger')].map((c) => c.textContent?.trim())).toEqual(['C1', 'C2', 'C10']);
    expect(el.querySelectorAll('.track')[2]!.querySelectorAll('.bar').length).toBe(0);
  });

  it('shows a charger out of service now only where the plan used it, with its power', async () => {
    const el = await render([
      { id: 'C2', maxKw: 30, out: true },
      { id: 'C10', maxKw: 120, out: true },
      { id: 'C1', maxKw: 60 },
    ]);
    const labels = [...el.querySelectorAll('.label')].map(
      (c) => `${c.querySelector('.charger')?.textContent?.trim()} ${c.querySelector('.kw')?.textContent?.trim()}`,
    );
    expect(labels).toEqual(['C1 60 kW', 'C2 30 kW']);
  });

  it("marks a charger's out-of-service span in its row, the legend, the summary and the phone list", async () => {
    const fixture = TestBed.createComponent(ChargerTimeline);
    // C10 is reported out at 18:30 and has no plug-in: its row is there, with the span marked.
    fixture.componentRef.setInput(
      'result',
      planResult({
        outOfService: [{ charger: 'C10', from: '2026-12-03T18:30:00.000-06:00', to: '2026-12-03T19:00:00.000-06:00' }],
      }),
    );
    fixture.componentRef.setInput('timezone', 'America/Chicago');
    fixture.componentRef.setInput('chargers', [
      { id: 'C1', maxKw: 60 },
      { id: 'C2', maxKw: 30 },
      { id: 'C10', maxKw: 120, out: true },
    ]);
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    expect([...el.querySelectorAll('.label .charger')].map((c) => c.textContent?.trim())).toEqual(['C1', 'C2', 'C10']);
    const outage = el.querySelectorAll('.track')[2]!.querySelector<HTMLElement>('.outage')!;
    expect(outage.title).toBe('Out of service 18:30–19:00');
    // The second half of the hour: from the middle of the track to its end.
    expect(parseFloat(outage.style.left)).toBeCloseTo(50, 5);
    expect(parseFloat(outage.style.width)).toBeCloseTo(50, 5);
    expect(el.querySelectorAll('.outage').length).toBe(1);
    expect(el.querySelector('.legend')!.textContent).toContain('Charger out of service');
    expect(el.querySelector('.grid')!.getAttribute('aria-label')).toContain('C10 out of service 18:30–19:00.');
    const phone = [...el.querySelectorAll('.phone-charger')].at(-1)!;
    expect(phone.textContent?.replace(/\s+/g, ' ')).toContain('Out of service 18:30–19:00');
  });

  it("names each price in the legend by its tariff period, as Rates does; an older plan's by its rank", async () => {
    const legendOf = async (periods: (string | undefined)[]) => {
      const fixture = TestBed.createComponent(ChargerTimeline);
      const base = planResult();
      fixture.componentRef.setInput(
        'result',
        planResult({ slots: base.slots.map((s, i) => (periods[i] ? { ...s, period: periods[i] } : s)) }),
      );
      fixture.componentRef.setInput('timezone', 'America/Chicago');
      fixture.componentRef.setInput('chargers', [{ id: 'C1', maxKw: 60 }]);
      await fixture.whenStable();
      fixture.detectChanges();
      const el = fixture.nativeElement as HTMLElement;
      return [...el.querySelectorAll('.legend li')].map((li) => li.textContent?.trim()).filter((t) => /kWh/.test(t!));
    };
    // 18:00-18:30 at $0.18 (on-peak), 18:30-19:00 at $0.068 (off-peak): cheapest first.
    expect(await legendOf(['on-peak', 'on-peak', 'off-peak', 'off-peak'])).toEqual([
      'off-peak: $0.068 per kWh',
      'on-peak: $0.180 per kWh',
    ]);
    expect(await legendOf([])).toEqual(['Lowest price: $0.068 per kWh', 'Highest price: $0.180 per kWh']);
  });

  it('names the day with each time on a weekend, where the same hour comes round more than once', async () => {
    const fixture = TestBed.createComponent(ChargerTimeline);
    const slot = (start: string) => ({ start, loadKw: 60, price: 0.068, limitKw: 150 });
    const base = planResult();
    fixture.componentRef.setInput(
      'result',
      planResult({
        slots: [
          slot('2026-12-04T16:00:00.000-06:00'),
          slot('2026-12-04T16:15:00.000-06:00'),
          slot('2026-12-07T05:45:00.000-06:00'),
        ],
        sessions: [
          {
            ...base.sessions[0]!,
            bus: '219',
            charger: 'C3',
            start: '2026-12-04T17:15:00.000-06:00',
            end: '2026-12-06T15:15:00.000-06:00',
          },
        ],
      }),
    );
    fixture.componentRef.setInput('timezone', 'America/Chicago');
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    const plug = el.querySelector('.phone-plugs li')!;
    expect(plug.textContent?.replace(/\s+/g, ' ')).toContain('Fri 17:15–Sun 15:15');
  });

  it('places each bar in proportion to its time across the night, labelled by bus', async () => {
    const el = await render();
    const bars = [...el.querySelectorAll<HTMLElement>('.bar')].map((b) => ({
      bus: b.textContent?.trim(),
      left: parseFloat(b.style.left),
      width: parseFloat(b.style.width),
    }));
    // The hour 18:00-19:00: 201 the first half hour, 203 the last quarter, 205 the second half hour.
    expect(bars).toEqual([
      { bus: '201', left: 0, width: 50 },
      { bus: '203', left: 75, width: 25 },
      { bus: '205', left: 50, width: 50 },
    ]);
    const tracks = el.querySelectorAll('.track');
    expect(tracks[0]!.textContent).toContain('201');
    expect(tracks[1]!.textContent).toContain('205');
  });

  it('marks short buses, shades the price bands and lists every plug-in in a table', async () => {
    const el = await render();
    expect([...el.querySelectorAll('.bar.short')].map((b) => b.textContent?.trim())).toEqual(['203', '205']);
    const bands = [...el.querySelectorAll<HTMLElement>('.bands .band')].map((b) => [
      b.dataset['level'],
      parseFloat(b.style.left),
      parseFloat(b.style.width),
    ]);
    expect(bands).toEqual([
      ['high', 0, 50],
      ['low', 50, 50],
    ]);
    const rows = [...el.querySelectorAll('table.alt tbody tr')].map((r) =>
      [...r.querySelectorAll('td')].map((td) => td.textContent?.trim()),
    );
    expect(rows.map((r) => r.slice(0, 4))).toEqual([
      ['C1', '201', 'Thu 18:00', 'Thu 18:30'],
      ['C1', '203 (short)', 'Thu 18:45', 'Thu 19:00'],
      ['C2', '205 (short)', 'Thu 18:30', 'Thu 19:00'],
    ]);
    expect(el.querySelector('[role="img"]')?.getAttribute('aria-label')).toContain('3 plug-ins on 3 chargers');
  });
});
