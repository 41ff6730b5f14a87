import { readFileSync } from 'node:fs';
import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import { DomainError } from '../http/errors';
import { checkIntervals, parseGreenButtonCsv, parseGreenButtonXml } from './green-button';

const fixture = (name: string) => readFileSync(new URL(`./fixtures/${name}`, import.meta.url), 'utf8');
const ZONE = 'America/Chicago';
/** The readings' night is over: the files were exported the next afternoon. */
const AFTER = DateTime.fromISO('2026-12-03T15:00', { zone: ZONE }).toMillis();
const period = [
  DateTime.fromISO('2026-12-01', { zone: ZONE }).toMillis(),
  DateTime.fromISO('2027-01-01', { zone: ZONE }).toMillis(),
] as const;

function fields(fn: () => unknown): Record<string, string> {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(DomainError);
    return { message: (e as DomainError).message, ...(e as DomainError).fields };
  }
  throw new Error('expected a rejection');
}

describe('Green Button XML (ESPI)', () => {
  // IntervalReading value x 10^powerOfTenMultiplier in the ReadingType's uom (72 = Wh); times are
  // UTC epoch seconds with a duration in seconds (Green Button / NAESB ESPI).
  const file = parseGreenButtonXml(fixture('green-button-night.xml'));

  it('scales values by powerOfTenMultiplier into kWh', () => {
    expect(file.intervals[0]).toEqual({ startMs: Date.parse('2026-12-02T06:00:00Z'), minutes: 15, kwh: 12 });
    // value 180 with multiplier 2 = 18,000 Wh = 18 kWh in 15 minutes = 72 kW.
    expect(file.intervals.find((i) => i.startMs === Date.parse('2026-12-02T08:00:00Z'))!.kwh).toBe(18);
  });

  it('reports the duplicate and the gap', () => {
    const checked = checkIntervals(file, ...period, ZONE, AFTER);
    expect(checked.duplicates).toBe(1);
    expect(checked.intervals).toHaveLength(23);
    expect(
      checked.gaps.map((g) => [
        DateTime.fromMillis(g.fromMs, { zone: ZONE }).toFormat('HH:mm'),
        DateTime.fromMillis(g.toMs, { zone: ZONE }).toFormat('HH:mm'),
      ]),
    ).toEqual([['02:15', '02:30']]);
  });

  it('refuses an unknown unit, a reading without a value, and two ReadingTypes', () => {
    expect(
      fields(() =>
        parseGreenButtonXml(
          fixture('green-button-night.xml').replace('<espi:uom>72</espi:uom>', '<espi:uom>38</espi:uom>'),
        ),
      )['ReadingType.uom'],
    ).toBe('Unsupported unit 38');
    expect(
      fields(() =>
        parseGreenButtonXml(fixture('green-button-night.xml').replace('<value>120</value>', '<value>12.5</value>')),
      )['IntervalReading[1].value'],
    ).toMatch(/not an integer/);
    expect(fields(() => parseGreenButtonXml('<feed><IntervalBlock/></feed>')).ReadingType).toBe('Missing');
    expect(fields(() => parseGreenButtonXml('not xml at all')).message).toMatch(/IntervalBlock|XML/);
  });
});

describe('Green Button CSV', () => {
  it('reads past the metadata lines; END TIME 22:14 closes a 15-minute interval', () => {
    const file = parseGreenButtonCsv(fixture('green-button-evening.csv'), ZONE);
    expect(file.intervals).toHaveLength(8);
    expect(file.intervals[0]).toEqual({
      startMs: DateTime.fromISO('2026-12-02T22:00', { zone: ZONE }).toMillis(),
      minutes: 15,
      kwh: 7.5,
    });
  });

  it('refuses mixed interval lengths, unknown units and readings outside the period', () => {
    const text = fixture('green-button-evening.csv');
    const mixed = parseGreenButtonCsv(text.replace('22:15,22:29', '22:15,22:59'), ZONE);
    expect(fields(() => checkIntervals(mixed, ...period, ZONE, AFTER)).message).toMatch(
      /mixes interval lengths \(15, 45 minutes\)/,
    );
    expect(fields(() => parseGreenButtonCsv(text.replace('7.50,kWh', '7.50,therms'), ZONE))['line 7.UNITS']).toMatch(
      /"therms" is not supported/,
    );
    const november = [
      DateTime.fromISO('2026-11-01', { zone: ZONE }).toMillis(),
      DateTime.fromISO('2026-12-01', { zone: ZONE }).toMillis(),
    ] as const;
    expect(fields(() => checkIntervals(parseGreenButtonCsv(text, ZONE), ...november, ZONE, AFTER)).message).toMatch(
      /8 readings lie outside the billing period/,
    );
  });

  it('refuses readings of intervals that have not ended yet, naming one', () => {
    // Common practice: a meter reports an interval once it has closed. 22:00-22:15 ends at 22:15.
    const file = parseGreenButtonCsv(fixture('green-button-evening.csv'), ZONE);
    const at2210 = DateTime.fromISO('2026-12-02T22:10', { zone: ZONE }).toMillis();
    const err = fields(() => checkIntervals(file, ...period, ZONE, at2210));
    expect(err.message).toMatch(
      /8 readings end after now \(2026-12-02 22:10\), e.g. the interval from 2026-12-02 22:00/,
    );
    expect(err.intervals).toBe('Readings in the future');
    const at2400 = DateTime.fromISO('2026-12-03T00:00', { zone: ZONE }).toMillis();
    expect(checkIntervals(file, ...period, ZONE, at2400).intervals).toHaveLength(8);
  });

  it('refuses intervals that neither fit in a quarter hour nor cover whole ones, and starts off the clock marks', () => {
    // Demand is billed on quarter hours (the brief): a 10-minute reading straddles two of them.
    const csv = (rows: string[]) =>
      parseGreenButtonCsv(
        [
          'TYPE,DATE,START TIME,END TIME,USAGE,UNITS,COST,NOTES',
          ...rows.map((r) => `Electric usage,2026-12-02,${r},kWh,$0.10,`),
        ].join('\n'),
        ZONE,
      );
    const tens = csv(['22:00,22:09,2.00', '22:10,22:19,2.00']);
    expect(fields(() => checkIntervals(tens, ...period, ZONE, AFTER)).message).toMatch(
      /10-minute intervals are not supported: export 5-, 15-, 30- or 60-minute intervals/,
    );
    const shifted = csv(['22:05,22:19,7.00', '22:20,22:34,7.00']);
    const err = fields(() => checkIntervals(shifted, ...period, ZONE, AFTER));
    expect(err.message).toMatch(/2 readings do not start on the clock's 15-minute marks, e.g. 2026-12-02 22:05:00/);
    expect(err.intervals).toBe('Off the clock marks');
    const fives = csv(['22:00,22:04,1.00', '22:05,22:09,2.00', '22:10,22:14,3.00']);
    expect(checkIntervals(fives, ...period, ZONE, AFTER)).toMatchObject({ minutes: 5, gaps: [] });
  });

  it('refuses the same interval twice with two different readings', () => {
    const text = fixture('green-button-evening.csv') + 'Electric usage,2026-12-02,22:00,22:14,9.00,kWh,$0.61,\n';
    expect(
      fields(() => checkIntervals(parseGreenButtonCsv(text, ZONE), ...period, ZONE, AFTER))['2026-12-02 22:00'],
    ).toMatch(/Two different readings/);
  });
});
