import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DomainError } from '../http/errors';
import { previewDay } from '@nightyard/scheduling';
import { importUrdb } from './urdb-import';

// Hand-written records of an invented utility, following the OpenEI URDB field definitions:
// energyratestructure[period][tier] with $/kWh = rate + adj, 12 x 24 weekday/weekend schedules of
// zero-based period indices, flatdemandstructure with flatdemandmonths, fixedchargefirstmeter.
const fixture = (name: string) => JSON.parse(readFileSync(new URL(`./fixtures/${name}`, import.meta.url), 'utf8'));
const summerWinter = fixture('urdb-summer-winter-evening-peak.json');

function hourlyPrices(def: Parameters<typeof previewDay>[0], date: string) {
  const preview = previewDay(def, date, 'America/Chicago');
  const prices: number[] = [];
  for (const i of preview.intervals) {
    const from = Number(i.start.slice(11, 13));
    const to = i.end.slice(0, 10) === date ? Number(i.end.slice(11, 13)) : 24;
    for (let h = from; h < to; h++) prices[h] = i.price;
  }
  return { preview, prices };
}

describe('URDB import: summer/winter plan with an evening on-peak', () => {
  const result = importUrdb(summerWinter);

  it('maps two seasons, the flat demand charge and the monthly fixed charge', () => {
    expect(result.name).toBe(
      'Prairie Wind Electric Cooperative (invented): General Service TOU with Demand (invented)',
    );
    const seasons = result.definition.seasons.map((s) => [s.fromMonth, s.toMonth, s.facilityDemandCharge]);
    expect(seasons).toEqual(
      expect.arrayContaining([
        [6, 9, 14.25],
        [10, 5, 9.8],
      ]),
    );
    expect(result.definition.fixedCharges).toEqual([{ name: 'Fixed charge', amount: 35, per: 'month' }]);
  });

  it('prices every hour of a summer weekday as the schedule says (rate + adj)', () => {
    const { preview, prices } = hourlyPrices(result.definition, '2027-07-14');
    expect(preview.dayType).toBe('weekday');
    for (let h = 0; h < 24; h++) {
      const schedulePeriod = summerWinter.energyweekdayschedule[6][h];
      const tier = summerWinter.energyratestructure[schedulePeriod][0];
      expect(prices[h], `hour ${h}`).toBeCloseTo(tier.rate + (tier.adj ?? 0), 10);
    }
    expect(preview.facilityDemandCharge).toBe(14.25);
  });

  it('prices every hour of a summer weekend and a winter weekday', () => {
    for (const [date, month, weekend] of [
      ['2027-07-17', 6, true],
      ['2027-01-13', 0, false],
      ['2027-01-16', 0, true],
    ] as const) {
      const { prices } = hourlyPrices(result.definition, date);
      const schedule = weekend ? summerWinter.energyweekendschedule : summerWinter.energyweekdayschedule;
      for (let h = 0; h < 24; h++) {
        const tier = summerWinter.energyratestructure[schedule[month][h]][0];
        expect(prices[h], `${date} hour ${h}`).toBeCloseTo(tier.rate + (tier.adj ?? 0), 10);
      }
    }
  });

  it('says what it simplified', () => {
    expect(result.notes.join(' ')).toMatch(/holidays use the weekend hours/);
  });
});

describe('URDB import: tiers, TOU demand, yearly fixed charge, API envelope', () => {
  const result = importUrdb(fixture('urdb-tiered-tou-demand.json'));

  it('uses the first tier and says so', () => {
    expect(result.notes.join(' ')).toMatch(/Energy period 0 has 2 tiers.*first tier's price \(0\.08\)/);
    const { prices } = hourlyPrices(result.definition, '2027-07-14');
    expect(prices[3]).toBeCloseTo(0.08, 10);
  });

  it('carries the on-peak demand charge and spreads the yearly fixed charge', () => {
    const summer = result.definition.seasons.find((s) => s.fromMonth === 6)!;
    const onPeak = summer.periods.find((p) => p.demandCharge > 0)!;
    expect(onPeak.demandCharge).toBe(6.5);
    expect(onPeak.windows).toEqual([{ dayTypes: ['weekday'], from: '16:00', to: '21:00' }]);
    expect(result.definition.fixedCharges[0]!.amount).toBe(50);
    expect(result.notes.join(' ')).toMatch(/coincident demand charges/);
  });
});

describe('URDB import: bad records name the field', () => {
  const bad = (mutate: (r: Record<string, unknown>) => void) => {
    const r = structuredClone(summerWinter);
    mutate(r);
    try {
      importUrdb(r);
    } catch (e) {
      expect(e).toBeInstanceOf(DomainError);
      return (e as DomainError).fields!;
    }
    throw new Error('expected a rejection');
  };

  it('a schedule with 11 months', () => {
    expect(bad((r) => (r.energyweekdayschedule as unknown[]).pop())).toEqual({
      energyweekdayschedule: 'A schedule has 12 months',
    });
  });
  it('a month with 23 hours', () => {
    expect(bad((r) => (r.energyweekendschedule as number[][])[3]!.pop())['energyweekendschedule[3]']).toMatch(
      /24 hourly entries/,
    );
  });
  it('an index missing from its structure', () => {
    expect(bad((r) => ((r.energyweekdayschedule as number[][])[0]![5] = 7))['energyweekdayschedule[0][5]']).toMatch(
      /Period 7 is not in energyratestructure/,
    );
  });
  it('flatdemandmonths with 11 entries', () => {
    expect(bad((r) => (r.flatdemandmonths as number[]).pop()).flatdemandmonths).toMatch(/12 entries/);
  });
  it('a tier without max before the last', () => {
    const f = bad((r) => ((r.energyratestructure as unknown[][])[0] = [{ rate: 0.1 }, { rate: 0.2 }]));
    expect(f['energyratestructure[0][0].max']).toBe('Every tier but the last needs a max');
  });
  it('no energy prices at all', () => {
    expect(bad((r) => delete r.energyratestructure).energyratestructure).toMatch(/Required/);
  });
  it('an unsupported unit', () => {
    expect(
      bad((r) => ((r.energyratestructure as { unit: string }[][])[1]![0]!.unit = 'kWh daily'))[
        'energyratestructure[1][0].unit'
      ],
    ).toMatch(/only kWh/);
  });
  it('not an object at all', () => {
    expect(() => importUrdb('hello')).toThrow(DomainError);
  });
});

describe('URDB import: tiered energy, demand ratchet and minimum charge', () => {
  // A flat invented rate: every hour period 0, two energy tiers (first 1,000 kWh at $0.10, the rest
  // at $0.085), an 80 % ratchet over 11 months, a $25/month minimum.
  const flat = Array.from({ length: 12 }, () => Array.from({ length: 24 }, () => 0));
  const record = {
    utility: 'Bluestem Rural Power (invented)',
    name: 'Small General Service (invented)',
    energyratestructure: [
      [
        { max: 1000, rate: 0.095, adj: 0.005, unit: 'kWh' },
        { rate: 0.08, adj: 0.005, unit: 'kWh' },
      ],
    ],
    energyweekdayschedule: flat,
    energyweekendschedule: flat,
    flatdemandstructure: [[{ rate: 8 }]],
    flatdemandmonths: Array.from({ length: 12 }, () => 0),
    demandratchetpercentage: Array.from({ length: 12 }, () => 0.8),
    lookbackrange: 11,
    demandwindow: 15,
    mincharge: 25,
    minchargeunits: '$/month',
    fixedchargefirstmeter: 12,
    fixedchargeunits: '$/month',
  };

  it("imports the tiers as monthly kWh blocks on the first tier's price", () => {
    const result = importUrdb(record);
    const season = result.definition.seasons[0]!;
    expect(season.offPeakPrice).toBeCloseTo(0.1, 10);
    expect(season.energyBlocks).toEqual([
      { uptoKwh: 1000, adder: 0 },
      { uptoKwh: null, adder: -0.015 },
    ]);
    expect(result.notes.join(' ')).toMatch(/2 monthly kWh blocks/);
    expect(result.notes.join(' ')).not.toMatch(/first tier's price \(/);
  });

  it('imports the ratchet (fractions read as percentages) and the minimum charge', () => {
    const result = importUrdb(record);
    expect(result.definition.demandRatchet).toEqual({ percent: 80, months: 11 });
    expect(result.definition.minimumCharge).toEqual({ amount: 25, per: 'month' });
    expect(result.definition.fixedCharges).toEqual([{ name: 'Fixed charge', amount: 12, per: 'month' }]);
    expect(result.notes.join(' ')).not.toMatch(/ratchet|minimum/i);
  });

  it('a ratchet that varies by month applies its highest value and says so', () => {
    const result = importUrdb({
      ...record,
      demandratchetpercentage: [80, 80, 80, 80, 80, 90, 90, 90, 90, 80, 80, 80],
      lookbackrange: undefined,
    });
    expect(result.definition.demandRatchet).toEqual({ percent: 90, months: 11 });
    expect(result.notes.join(' ')).toMatch(/varies by month.*90 %/);
    expect(result.notes.join(' ')).toMatch(/previous 11 months \(common practice\)/);
  });

  it("tiers that differ between periods keep the first tier's price and say so", () => {
    const two = flat.map((m) => m.map((_, h) => (h >= 16 && h < 20 ? 1 : 0)));
    const result = importUrdb({
      ...record,
      energyweekdayschedule: two,
      energyweekendschedule: flat,
      energyratestructure: [record.energyratestructure[0], [{ max: 500, rate: 0.2 }, { rate: 0.25 }]],
    });
    expect(result.definition.seasons[0]!.energyBlocks).toEqual([]);
    expect(result.notes.join(' ')).toMatch(/tiers differ between periods/);
  });
});
