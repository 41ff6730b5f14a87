import { describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { parseScenario, type Scenario, type ScenarioInput } from '@nightyard/scheduling';
import { generateDepot } from '../../../../libs/scheduling/src/testing/generate-depot';
import { versionInputChanges, type VersionInputs } from './version-inputs';

function scenario(change: (s: ScenarioInput) => void = () => undefined): Scenario {
  const input = generateDepot({ buses: 8, chargers: 3, seed: 5 });
  change(input);
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.scenario;
}

const result = (r: Partial<PlanResult> = {}) => ({ sessions: [], buses: [], slots: [], ...r }) as unknown as PlanResult;
const version = (v: number, s: Scenario, r: Partial<PlanResult> = {}): VersionInputs => ({
  version: v,
  scenario: s,
  result: result(r),
  includesMidday: true,
});

describe('how two versions of a night differ in their inputs', () => {
  it('says nothing when both were planned from the same inputs', () => {
    expect(versionInputChanges(version(1, scenario()), version(2, scenario()))).toEqual([]);
  });

  it('names each input that moves the cost, with both values', () => {
    const before = scenario();
    const after = scenario((s) => {
      s.site.limitKw = 150;
      s.tariff.peaksSoFarKw = { ...s.tariff.peaksSoFarKw, facility: 280 };
      s.tariff.offPeakPrice = 0.1;
      s.chargers = s.chargers.slice(0, 2);
      s.buses[0]!.arrivalKwh += 10;
      s.buses[1]!.stays[0]!.departMinKwh += 5;
      s.buses.pop();
    });
    const out = versionInputChanges(
      version(1, before, { target: { peaks: [{ name: 'facility', kw: 100, targetKw: 120 }] } as PlanResult['target'] }),
      version(3, after, {
        target: { peaks: [{ name: 'facility', kw: 100, targetKw: 140 }] } as PlanResult['target'],
        outOfService: [{ charger: 'C002', from: '2026-01-14T23:00:00.000-06:00', to: '2026-01-15T12:00:00.000-06:00' }],
      }),
    );
    expect(out).toEqual([
      `Service limit ${before.site.limitKw} kW in version 1, 150 kW in version 3`,
      `The billing period's facility peak so far ${before.tariff.peaksSoFarKw['facility']} kW in version 1, 280 kW in version 3`,
      'Demand target (facility) 120 kW in version 1, 140 kW in version 3',
      "The rate plan's prices differ between version 1 and version 3",
      'Charger C002 in service in version 1, out of service from 23:00 in version 3',
      'Charger C003 is planned on in version 1 only',
      'Bus B008 planned in version 1 only',
      'Runs or pull-out needs differ for bus B002',
      'Arrival energy differs for bus B001 (readings, runs or the fleet)',
    ]);
  });

  it("says one version leaves out the midday layover, not that every bus's stays differ", () => {
    const s = scenario();
    const without = {
      ...version(
        2,
        scenario((x) => x.buses.forEach((b) => (b.arrivalKwh += 1))),
      ),
      includesMidday: false,
    };
    expect(versionInputChanges(version(1, s), without)).toEqual([
      'Version 2 leaves out the midday layover; version 1 plans it',
    ]);
  });
});
