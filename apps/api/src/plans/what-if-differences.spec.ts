import { describe, expect, it } from 'vitest';
import { parseScenario, type Scenario, type ScenarioInput } from '@nightyard/scheduling';
import { whatIfDifferences } from './what-if-differences';

/** A small night at a Chicago depot: two chargers on a cabinet, one alone, two buses. */
function night(change: (s: ScenarioInput) => void = () => undefined): Scenario {
  const input: ScenarioInput = {
    version: 1,
    timezone: 'America/Chicago',
    start: '2026-12-09T16:00',
    end: '2026-12-10T06:30',
    slotMinutes: 15,
    efficiency: 0.92,
    site: { limitKw: 400, otherLoadKw: 20 },
    cabinets: [{ id: 'P1', limitKw: 120 }],
    chargers: [
      { id: 'C1', maxKw: 60, cabinet: 'P1' },
      { id: 'C2', maxKw: 60, cabinet: 'P1' },
      { id: 'C3', maxKw: 30 },
    ],
    tariff: {
      currency: 'USD',
      offPeakPrice: 0.08,
      facilityDemandCharge: 12,
      peaksSoFarKw: {},
      periods: [
        {
          name: 'on-peak',
          price: 0.27,
          demandCharge: 9.5,
          windows: [{ days: [1, 2, 3, 4, 5], from: '16:00', to: '21:00' }],
        },
      ],
    },
    buses: [
      {
        id: '201',
        usableKwh: 196,
        maxKw: 60,
        arrivalKwh: 60,
        reserveKwh: 29,
        ceilingKwh: 176,
        stays: [{ arrive: '2026-12-09T16:20', depart: '2026-12-10T06:10', departMinKwh: 120 }],
      },
      {
        id: '202',
        usableKwh: 155,
        maxKw: 60,
        arrivalKwh: 50,
        reserveKwh: 23,
        ceilingKwh: 140,
        stays: [{ arrive: '2026-12-09T16:25', depart: '2026-12-10T06:15', departMinKwh: 100 }],
      },
    ],
  };
  change(input);
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.scenario;
}

const chargers = [
  { label: 'C1', status: 'in_service' as const, statusReason: null },
  { label: 'C2', status: 'in_service' as const, statusReason: null },
  { label: 'C3', status: 'out_of_service' as const, statusReason: 'cable damaged' },
];

describe('what a what-if differs in from the depot now', () => {
  it('nothing, when the study still describes the depot', () => {
    expect(whatIfDifferences(night(), night(), chargers)).toEqual([]);
  });

  it('names the site, the chargers, the rate plan and the buses in plain sentences', () => {
    const study = night((s) => {
      s.site.limitKw = 150;
      s.site.limitWindows = [{ from: '2026-12-09T17:00', to: '2026-12-09T19:00', limitKw: 100 }];
      s.chargers[1]!.maxKw = 50;
      s.chargers.push({ id: 'C9', maxKw: 60 });
      s.tariff.periods![0]!.price = 0.3;
      s.tariff.periods![0]!.windows[0]!.to = '20:00';
      s.buses[0]!.arrivalKwh = 40;
      s.buses[1]!.id = '299';
    });
    const now = night((s) => {
      s.chargers = s.chargers.filter((c) => c.id !== 'C3');
      s.buses[0]!.stays[0]!.depart = '2026-12-10T06:00';
    });
    expect(whatIfDifferences(study, now, chargers)).toEqual([
      'Service limit in the study 150 kW, depot now 400 kW',
      'Load-reduction windows in the study: 17:00-19:00 at 100 kW; depot now: none',
      'Charger C2 in the study 50 kW, depot now 60 kW',
      'Charger C3 out of service now (cable damaged): left out',
      'Charger C9 is in the study but not at the depot: left out',
      'Rate plan changed: on-peak energy in the study 0.30 USD/kWh, depot now 0.27 USD/kWh',
      'Rate plan changed: the hours of on-peak differ from the study',
      "Bus 201 arrives in the study with 40 kWh, the day's data now says 60 kWh",
      'Bus 201 at the depot in the study 16:20-06:10, from the runs now 16:20-06:00',
      'Bus 299 is in the study but has no run to plan for now (or is not active): left out',
      'Bus 202 has runs now but is not in the study: included',
    ]);
  });
});
