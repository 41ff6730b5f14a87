import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { planScenario } from './plan.js';
import { parseScenario, type ScenarioInput } from './scenario.js';
import { checkPlan } from './testing/plan-checker.js';

// The demo depot's weekend (testing/demo-weekend.json: invented demo data, Friday 15:45 to
// Monday 07:00) with charger D2 (120 kW) out of service from Saturday 00:00 to Sunday 12:00.
const weekend = JSON.parse(
  readFileSync(new URL('./testing/demo-weekend.json', import.meta.url), 'utf8'),
) as ScenarioInput;
const OUT = { from: '2026-12-05T00:00', to: '2026-12-06T12:00' };
const withOutage = {
  ...weekend,
  chargers: weekend.chargers.map((c) => (c.id === 'D2' ? { ...c, outOfService: [OUT] } : c)),
};

function parsed(input: ScenarioInput) {
  const p = parseScenario(input);
  if (!p.ok) throw new Error(JSON.stringify(p.problems));
  return p.scenario;
}

describe('a charger out of service for part of the horizon', () => {
  it('is planned outside its outage only, with every crew rule kept', async () => {
    const plan = await planScenario(parsed(withOutage));
    // The checker fails any session that overlaps the outage, and every crew rule.
    expect(checkPlan(withOutage, plan)).toEqual([]);
    expect(plan.stats.shortfallKwh).toBe(0);
    const onD2 = plan.sessions.filter((s) => s.charger === 'D2');
    // Before: the charger was left out of the whole weekend. Now it serves Friday evening and
    // from Sunday noon on.
    expect(onD2.some((s) => Date.parse(s.end) <= Date.parse('2026-12-05T00:00:00-06:00'))).toBe(true);
    expect(onD2.some((s) => Date.parse(s.start) >= Date.parse('2026-12-06T12:00:00-06:00'))).toBe(true);
    // The plan says where: the outage's span, for the timeline and the run sheets.
    expect(plan.outOfService.map((o) => [o.charger, Date.parse(o.from), Date.parse(o.to)])).toEqual([
      ['D2', Date.parse('2026-12-05T00:00:00-06:00'), Date.parse('2026-12-06T12:00:00-06:00')],
    ]);
  });

  it('a night planned again after the outage is booked keeps the rest of the published plan', async () => {
    const v1 = await planScenario(parsed(weekend));
    const again = await planScenario(parsed(withOutage), { previous: v1 });
    expect(checkPlan(withOutage, again)).toEqual([]);
    // D2 held 5 buses in turn in version 1, 2 of them inside the outage; measured: 4 buses change
    // (the walkthrough saw all 24 change when D2 was left out of the whole weekend).
    expect(again.keptPrevious).not.toBeNull();
    expect(again.moved!.buses.length).toBeLessThanOrEqual(5);
  });

  it('names a span that ends before it starts', () => {
    const bad = parseScenario({
      ...weekend,
      chargers: weekend.chargers.map((c) =>
        c.id === 'D2' ? { ...c, outOfService: [{ from: OUT.to, to: OUT.from }] } : c,
      ),
    });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.problems.map((p) => p.path)).toContain('chargers[9].outOfService[0].to');
  });
});
