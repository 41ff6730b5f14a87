import { TestBed } from '@angular/core/testing';
import { depot } from '../testing/fixtures';
import { formatClock } from './depot-format';
import { DepotSummaryCard } from './depot-summary-card';

describe('DepotSummaryCard', () => {
  async function render(d = depot()) {
    const fixture = TestBed.createComponent(DepotSummaryCard);
    fixture.componentRef.setInput('depot', d);
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    const facts = Object.fromEntries(
      [...el.querySelectorAll('.fact')].map((f) => [
        f.querySelector('dt')?.textContent?.trim(),
        f.querySelector('dd')?.textContent?.replace(/\s+/g, ' ').trim(),
      ]),
    );
    return { el, facts };
  }

  it('shows the depot as the API describes it', async () => {
    const { el, facts } = await render();
    expect(el.querySelector('h2')?.textContent?.trim()).toBe('North Depot');
    expect(el.textContent).toContain('America/Chicago');
    expect(facts['Service limit']).toBe('500 kW');
    expect(facts['Chargers in service']).toBe('5 of 6 (1 out of service)');
    expect(facts['Buses']).toBe('12');
    expect(facts['Rate plan']).toBe('Commercial TOU');
    expect(facts['First pull-out']).toBe('05:40');
    expect(facts['Last pull-out']).toBe('07:10');
    expect(facts['Next service day']).toContain('2026');
    expect(facts['Buses going out']).toBe('11');
  });

  it('names the buses reported absent tonight beside the count going out', async () => {
    const base = depot().nextServiceDay!;
    const { facts } = await render(depot({ nextServiceDay: { ...base, busesOut: 10, absentBuses: ['220'] } }));
    expect(facts['Buses going out']).toBe('10 (bus 220 absent tonight)');
    const two = await render(depot({ nextServiceDay: { ...base, busesOut: 9, absentBuses: ['213', '220'] } }));
    expect(two.facts['Buses going out']).toBe('9 (buses 213, 220 absent tonight)');
  });

  it('says plainly when there is no rate plan or service day yet', async () => {
    const { facts } = await render(depot({ ratePlanName: null, nextServiceDay: null }));
    expect(facts['Rate plan']).toBe('None set yet');
    expect(facts['Next service day']).toBe('No service day with runs yet');
    expect(facts['First pull-out']).toBeUndefined();
  });

  it('reads pull-out instants in the depot time zone', () => {
    expect(formatClock('2026-12-03T11:40:00Z', 'America/Chicago')).toBe('05:40');
    expect(formatClock('5:05', 'America/Chicago')).toBe('05:05');
    expect(formatClock(null, 'UTC')).toBeNull();
  });
});
