import { parse as parseCsv } from 'csv-parse/sync';
import { XMLParser } from 'fast-xml-parser';
import { DateTime } from 'luxon';
import { FIRST_YEAR, LAST_YEAR, MAX_KW } from '@nightyard/contracts';
import { DomainError } from '../http/errors';

/** One metered interval: start (epoch ms), length and energy drawn from the grid. */
export interface MeterInterval {
  startMs: number;
  minutes: number;
  kwh: number;
}

export interface MeterFile {
  format: 'green-button-xml' | 'green-button-csv';
  intervals: MeterInterval[];
}

/** ESPI unit-of-measure codes (Green Button): 72 = Wh, 38 = W. */
const UOM_WH = 72;
/** ESPI powers of ten run from pico (-12) to tera (12). */
const MAX_POWER_OF_TEN = 12;
const FIRST_MS = Date.UTC(FIRST_YEAR, 0, 1);
/** Interval lengths that lie inside one quarter hour or cover whole ones (minutes). */
const SUPPORTED_MINUTES = [1, 3, 5, 15, 30, 60];
const END_MS = Date.UTC(LAST_YEAR + 1, 0, 1);

/**
 * Why an interval's energy cannot be right, or null: it must be a finite amount of 0 kWh or
 * more whose average power stays within what any depot connection could draw (MAX_KW).
 */
export function energyProblem(kwh: number, minutes: number): string | null {
  if (!Number.isFinite(kwh)) return 'The energy is not a finite number';
  if (kwh < 0) return `${kwh} kWh is negative: import the energy drawn from the grid`;
  const kw = (kwh * 60) / minutes;
  if (kw > MAX_KW)
    return `${kwh} kWh in ${minutes} minutes is ${Math.round(kw).toLocaleString('en-US')} kW on average, above ${MAX_KW.toLocaleString('en-US')} kW: check the unit and multiplier`;
  return null;
}

/** Why an interval's start and length cannot be right, or null. */
function timeProblem(startMs: number, minutes: number): string | null {
  if (!Number.isFinite(startMs) || startMs < FIRST_MS || startMs >= END_MS)
    return `The start must lie in the years ${FIRST_YEAR} to ${LAST_YEAR}`;
  if (!Number.isFinite(minutes) || minutes <= 0 || minutes > 1440)
    return 'The length must be above 0 and at most one day';
  return null;
}

function fail(message: string, fields: Record<string, string>): never {
  throw new DomainError('validation_failed', message, fields);
}

const asArray = <T>(v: T | T[] | undefined): T[] => (v === undefined ? [] : Array.isArray(v) ? v : [v]);

/**
 * Green Button (ESPI) XML: each IntervalReading's `value` is an integer; the quantity is
 * value x 10^powerOfTenMultiplier in the ReadingType's `uom`; times are UTC epoch seconds with a
 * `duration` in seconds.
 */
export function parseGreenButtonXml(text: string): MeterFile {
  let doc: Record<string, unknown>;
  try {
    doc = new XMLParser({ removeNSPrefix: true, ignoreAttributes: true, parseTagValue: false }).parse(text);
  } catch (e) {
    fail('The file is not readable XML', { file: (e as Error).message });
  }
  const found: { readingTypes: Record<string, string>[]; blocks: Record<string, unknown>[] } = {
    readingTypes: [],
    blocks: [],
  };
  const walk = (node: unknown) => {
    if (!node || typeof node !== 'object') return;
    for (const [key, value] of Object.entries(node as Record<string, unknown>)) {
      if (key === 'ReadingType') found.readingTypes.push(...(asArray(value) as Record<string, string>[]));
      else if (key === 'IntervalBlock') found.blocks.push(...(asArray(value) as Record<string, unknown>[]));
      else for (const v of asArray(value)) walk(v);
    }
  };
  walk(doc);
  if (!found.blocks.length)
    fail('No IntervalBlock in the file: is it a Green Button usage export?', { IntervalBlock: 'Missing' });
  if (found.readingTypes.length !== 1) {
    fail(
      found.readingTypes.length
        ? 'The file has several ReadingTypes: export one meter reading at a time'
        : 'The file has no ReadingType, so its unit is unknown',
      { ReadingType: found.readingTypes.length ? 'More than one' : 'Missing' },
    );
  }
  const rt = found.readingTypes[0]!;
  const uom = Number(rt.uom);
  const power = Number(rt.powerOfTenMultiplier ?? 0);
  if (uom !== UOM_WH)
    fail(`Unit ${rt.uom} is not supported: the readings must be energy in Wh (uom 72)`, {
      'ReadingType.uom': `Unsupported unit ${rt.uom}`,
    });
  if (!Number.isInteger(power))
    fail('powerOfTenMultiplier must be a whole number', { 'ReadingType.powerOfTenMultiplier': 'Not an integer' });
  if (Math.abs(power) > MAX_POWER_OF_TEN) {
    fail(`powerOfTenMultiplier ${power} is out of range: ESPI uses -${MAX_POWER_OF_TEN} to ${MAX_POWER_OF_TEN}`, {
      'ReadingType.powerOfTenMultiplier': `Use -${MAX_POWER_OF_TEN} to ${MAX_POWER_OF_TEN}`,
    });
  }
  const scale = 10 ** power / 1000; // Wh -> kWh
  const intervals: MeterInterval[] = [];
  const fields: Record<string, string> = {};
  let n = 0;
  for (const block of found.blocks) {
    for (const reading of asArray(block.IntervalReading as Record<string, unknown> | Record<string, unknown>[])) {
      n++;
      const period = reading.timePeriod as { start?: string; duration?: string } | undefined;
      const value = Number(reading.value);
      const start = Number(period?.start);
      const duration = Number(period?.duration);
      if (!Number.isInteger(value)) fields[`IntervalReading[${n}].value`] = `"${reading.value}" is not an integer`;
      else if (!Number.isFinite(start) || !Number.isFinite(duration) || duration <= 0)
        fields[`IntervalReading[${n}].timePeriod`] = 'Needs start and duration in seconds';
      else {
        const interval = { startMs: start * 1000, minutes: duration / 60, kwh: value * scale };
        const when = timeProblem(interval.startMs, interval.minutes);
        const energy = when ? null : energyProblem(interval.kwh, interval.minutes);
        if (when) fields[`IntervalReading[${n}].timePeriod`] = when;
        else if (energy)
          fields[`IntervalReading[${n}].value`] = `${new Date(interval.startMs).toISOString()}: ${energy}`;
        else intervals.push(interval);
      }
    }
  }
  if (Object.keys(fields).length) fail('Some readings are not valid; nothing was imported', fields);
  return { format: 'green-button-xml', intervals };
}

/**
 * Green Button CSV as utilities export it: metadata lines, then a header with TYPE, DATE,
 * START TIME, END TIME, USAGE, UNITS (COST, NOTES optional). Times are local to the meter.
 */
export function parseGreenButtonCsv(text: string, zone: string): MeterFile {
  let rows: string[][];
  let lineOf: number[];
  try {
    const parsed = parseCsv(text.replace(/^\uFEFF/, ''), {
      relax_column_count: true,
      skip_empty_lines: true,
      trim: true,
      info: true,
    }) as unknown as { record: string[]; info: { lines: number } }[];
    rows = parsed.map((p) => p.record);
    lineOf = parsed.map((p) => p.info.lines);
  } catch (e) {
    fail('The file is not readable CSV', { file: (e as Error).message });
  }
  const headerAt = rows.findIndex(
    (r) => r.map((c) => c.toUpperCase()).includes('START TIME') && r.map((c) => c.toUpperCase()).includes('USAGE'),
  );
  if (headerAt < 0)
    fail('No header line with DATE, START TIME, END TIME, USAGE and UNITS was found', { header: 'Missing' });
  const header = rows[headerAt]!.map((c) => c.toUpperCase());
  const col = (name: string) => header.indexOf(name);
  for (const need of ['DATE', 'START TIME', 'END TIME', 'USAGE', 'UNITS']) {
    if (col(need) < 0)
      fail(`The header has no ${need} column`, { [`line ${lineOf[headerAt]}`]: `Column ${need} is missing` });
  }
  const intervals: MeterInterval[] = [];
  const fields: Record<string, string> = {};
  rows.slice(headerAt + 1).forEach((r, k) => {
    const line = lineOf[headerAt + 1 + k]!;
    const get = (name: string) => r[col(name)] ?? '';
    const unit = get('UNITS').toLowerCase();
    const factor = unit === 'kwh' ? 1 : unit === 'wh' ? 0.001 : null;
    if (factor === null) {
      fields[`line ${line}.UNITS`] ??= `Unit "${get('UNITS')}" is not supported: kWh or Wh`;
      return;
    }
    const start = DateTime.fromFormat(`${get('DATE')} ${get('START TIME')}`, 'yyyy-MM-dd HH:mm', { zone });
    const endRaw = DateTime.fromFormat(`${get('DATE')} ${get('END TIME')}`, 'yyyy-MM-dd HH:mm', { zone });
    const usage = Number(get('USAGE').replace(/,/g, ''));
    if (!start.isValid || !endRaw.isValid) {
      fields[`line ${line}.DATE`] ??= 'Write dates YYYY-MM-DD and times HH:mm';
      return;
    }
    if (!Number.isFinite(usage) || usage < 0) {
      fields[`line ${line}.USAGE`] ??= `"${get('USAGE')}" is not an amount of energy`;
      return;
    }
    // END TIME is the interval's last minute (00:00-00:14) or its end (00:00-00:15).
    let end = endRaw.minute % 5 === 4 ? endRaw.plus({ minutes: 1 }) : endRaw;
    if (end <= start) end = end.plus({ days: 1 });
    const interval = { startMs: start.toMillis(), minutes: end.diff(start, 'minutes').minutes, kwh: usage * factor };
    const when = timeProblem(interval.startMs, interval.minutes);
    if (when) {
      fields[`line ${line}.DATE`] ??= when;
      return;
    }
    const energy = energyProblem(interval.kwh, interval.minutes);
    if (energy) {
      fields[`line ${line}.USAGE`] ??= `${get('DATE')} ${get('START TIME')}: ${energy}`;
      return;
    }
    intervals.push(interval);
  });
  if (Object.keys(fields).length) fail('Some lines are not valid; nothing was imported', fields);
  return { format: 'green-button-csv', intervals };
}

export interface IntervalCheck {
  minutes: number;
  intervals: MeterInterval[];
  duplicates: number;
  gaps: { fromMs: number; toMs: number }[];
}

/** Uniform length, inside the billing period, none ending after now, duplicates merged (same value) or refused. */
export function checkIntervals(
  file: MeterFile,
  periodStartMs: number,
  periodEndMs: number,
  zone: string,
  nowMs: number,
): IntervalCheck {
  const lengths = [...new Set(file.intervals.map((i) => i.minutes))];
  if (!file.intervals.length) fail('The file has no readings', { file: 'Empty' });
  if (lengths.length > 1)
    fail(`The file mixes interval lengths (${lengths.join(', ')} minutes): export one length`, {
      intervals: 'Mixed lengths',
    });
  const minutes = lengths[0]!;
  // Demand is billed on quarter hours: a reading must fall inside one or cover whole ones.
  if (!SUPPORTED_MINUTES.includes(minutes))
    fail(`${minutes}-minute intervals are not supported: export 5-, 15-, 30- or 60-minute intervals`, {
      intervals: `${minutes} minutes`,
    });
  const local = (ms: number) => DateTime.fromMillis(ms, { zone }).toFormat('yyyy-MM-dd HH:mm');
  const offMark = file.intervals.filter((i) => {
    const t = DateTime.fromMillis(i.startMs, { zone });
    return t.minute % minutes !== 0 || t.second !== 0 || t.millisecond !== 0;
  });
  if (offMark.length) {
    fail(
      `${offMark.length} readings do not start on the clock's ${minutes}-minute marks, e.g. ${DateTime.fromMillis(offMark[0]!.startMs, { zone }).toFormat('yyyy-MM-dd HH:mm:ss')}: check the file's start times and time zone`,
      { intervals: 'Off the clock marks' },
    );
  }
  const outside = file.intervals.filter((i) => i.startMs < periodStartMs || i.startMs + minutes * 60_000 > periodEndMs);
  if (outside.length) {
    fail(
      `${outside.length} readings lie outside the billing period ${local(periodStartMs)} to ${local(periodEndMs)}, e.g. ${local(outside[0]!.startMs)}`,
      { intervals: 'Outside the billing period' },
    );
  }
  // A meter cannot have read an interval that has not ended yet: the file is mislabelled (zone,
  // date) or not a meter's.
  const future = file.intervals.filter((i) => i.startMs + minutes * 60_000 > nowMs);
  if (future.length) {
    fail(
      `${future.length} readings end after now (${local(nowMs)}), e.g. the interval from ${local(future[0]!.startMs)}: a meter only reads intervals that have passed; check the file's dates and time zone`,
      { intervals: 'Readings in the future' },
    );
  }
  const byStart = new Map<number, MeterInterval>();
  let duplicates = 0;
  const fields: Record<string, string> = {};
  for (const i of file.intervals) {
    const seen = byStart.get(i.startMs);
    if (seen) {
      duplicates++;
      if (Math.abs(seen.kwh - i.kwh) > 1e-9)
        fields[local(i.startMs)] = `Two different readings (${seen.kwh} and ${i.kwh} kWh)`;
    } else byStart.set(i.startMs, i);
  }
  if (Object.keys(fields).length)
    fail('Some intervals appear twice with different readings; nothing was imported', fields);
  const sorted = [...byStart.values()].sort((a, b) => a.startMs - b.startMs);
  const gaps: IntervalCheck['gaps'] = [];
  for (let k = 1; k < sorted.length; k++) {
    const expected = sorted[k - 1]!.startMs + minutes * 60_000;
    if (sorted[k]!.startMs > expected) gaps.push({ fromMs: expected, toMs: sorted[k]!.startMs });
  }
  return { minutes, intervals: sorted, duplicates, gaps };
}
