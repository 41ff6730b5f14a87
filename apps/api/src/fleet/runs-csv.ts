import { parse } from 'csv-parse/sync';
import { MAX_RUNS_PER_DAY, fieldPath, runInputSchema, type RunInput } from '@nightyard/contracts';
import { DomainError } from '../http/errors';

/** Columns of a service day's runs file; the template lists them with two example rows. */
export const RUN_COLUMNS = ['bus', 'pull_out', 'pull_in', 'miles', 'kwh', 'arrival_soc_pct'] as const;

export function runsCsvTemplate(bus = '201'): string {
  return [RUN_COLUMNS.join(','), `${bus},06:10,08:25,31.5,,`, `${bus},14:05,16:30,,42,38`].join('\r\n') + '\r\n';
}

const FIELD_FOR: Record<string, string> = {
  busNumber: 'bus',
  pullOut: 'pull_out',
  pullIn: 'pull_in',
  miles: 'miles',
  kwh: 'kwh',
  arrivalSocPct: 'arrival_soc_pct',
  bus: 'bus',
};

export const csvField = (field: string) => FIELD_FOR[field] ?? field;

const CLOCK = /^(\d{1,2}):(\d{2})$/;
const DATED = /^(\d{4}-\d{2}-\d{2})[ T](\d{1,2}):(\d{2})$/;

/**
 * Reads a runs file for one service day. Times may be `HH:mm` (on the service day; a pull-in
 * earlier than its pull-out is the next morning) or `YYYY-MM-DD HH:mm`. Returns the rows that
 * read well with their line numbers, and `problems`: every bad value of the file at once, named
 * `line N.column`, in the time format the file itself uses. The caller checks the good rows
 * against the fleet and reports both together, so one upload names every problem.
 */
export function parseRunsCsv(
  text: string,
  date: string,
): { runs: RunInput[]; lines: number[]; problems: Record<string, string> } {
  let records: string[][];
  let lineOf: number[];
  try {
    const parsed = parse(text.replace(/^\uFEFF/, ''), {
      skip_empty_lines: true,
      trim: true,
      relax_column_count: true,
      info: true,
    }) as unknown as { record: string[]; info: { lines: number } }[];
    records = parsed.map((p) => p.record);
    lineOf = parsed.map((p) => p.info.lines);
  } catch (e) {
    throw new DomainError('validation_failed', `The file is not readable CSV: ${(e as Error).message}`, {
      file: 'Not valid CSV',
    });
  }
  const [header, ...rows] = records;
  // A spreadsheet saved with semicolons (or tabs) reads as one column per line: say so plainly.
  if (header && header.length === 1 && /[;\t]/.test(header[0] ?? '')) {
    const sep = (header[0] ?? '').includes(';') ? 'semicolons' : 'tabs';
    throw new DomainError(
      'validation_failed',
      `The file separates its columns with ${sep}: save it as CSV with commas (the template shows how); nothing was saved`,
      {
        file: `Columns separated by ${sep}: use commas`,
      },
    );
  }
  const columns = (header ?? []).map((h) => h.toLowerCase());
  const missing = RUN_COLUMNS.filter(
    (c) => c !== 'kwh' && c !== 'miles' && c !== 'arrival_soc_pct' && !columns.includes(c),
  );
  const unknown = columns.filter((c) => !(RUN_COLUMNS as readonly string[]).includes(c));
  if (missing.length || unknown.length) {
    const fields: Record<string, string> = {};
    const at = lineOf[0] ?? 1;
    for (const c of missing) fields[`line ${at}.${c}`] = `Column "${c}" is missing: start from the template`;
    for (const c of unknown)
      fields[`line ${at}.${c}`] = `Unknown column "${c}": the columns are ${RUN_COLUMNS.join(', ')}`;
    throw new DomainError('validation_failed', 'The header line does not match the template', fields);
  }
  if (rows.length > MAX_RUNS_PER_DAY) {
    throw new DomainError(
      'payload_too_large',
      `The file has ${rows.length} runs; a service day holds at most ${MAX_RUNS_PER_DAY}: nothing was saved`,
      {
        file: `At most ${MAX_RUNS_PER_DAY} rows below the header`,
      },
    );
  }
  const col = (row: string[], name: string) => row[columns.indexOf(name)]?.trim() ?? '';
  // The time format the file uses (most of its times), to name it in the messages.
  const times = rows.flatMap((r) => [col(r, 'pull_out'), col(r, 'pull_in')]).filter((v) => v !== '');
  const dated = times.filter((v) => DATED.test(v)).length > times.filter((v) => CLOCK.test(v)).length;
  const format = dated ? 'YYYY-MM-DD HH:mm' : 'HH:mm';
  const example = dated ? `${date} 06:10` : '06:10';
  const fields: Record<string, string> = {};
  const runs: RunInput[] = [];
  const lines: number[] = [];
  rows.forEach((row, k) => {
    const line = lineOf[k + 1]!;
    const at = (name: string) => `line ${line}.${name}`;
    /** A time as the API takes it, or null (and the problem noted) when it is not one. */
    const time = (name: string): string | null => {
      const v = col(row, name);
      if (v === '') {
        fields[at(name)] ??=
          `Enter the ${name === 'pull_out' ? 'pull-out' : 'pull-in'} time as ${format}, e.g. ${example}`;
        return null;
      }
      const m = CLOCK.exec(v) ?? DATED.exec(v);
      const [hh, mm] = m ? (m.length === 3 ? [m[1], m[2]] : [m[2], m[3]]).map(Number) : [NaN, NaN];
      if (!m || hh! > 23 || mm! > 59) {
        fields[at(name)] ??= `"${v}" is not a time of day: use ${format}, 00:00 to 23:59 (e.g. ${example})`;
        return null;
      }
      const hhmm = `${String(hh).padStart(2, '0')}:${String(mm).padStart(2, '0')}`;
      return m.length === 3 ? `${date}T${hhmm}` : `${m[1]}T${hhmm}`;
    };
    const num = (name: string) => {
      const v = col(row, name);
      if (v === '') return null;
      const n = Number(v);
      if (!Number.isFinite(n)) fields[at(name)] ??= `"${v}" is not a number`;
      return n;
    };
    const pullOut = time('pull_out');
    let pullIn = time('pull_in');
    if (pullOut && pullIn && CLOCK.test(col(row, 'pull_in')) && pullIn <= pullOut) {
      // An HH:mm pull-in before the pull-out is the next morning.
      const next = new Date(`${date}T00:00:00Z`);
      next.setUTCDate(next.getUTCDate() + 1);
      pullIn = `${next.toISOString().slice(0, 10)}${pullIn.slice(10)}`;
    }
    const miles = num('miles');
    const kwh = num('kwh');
    if (miles !== null && kwh !== null) {
      fields[at('kwh')] ??= "Give the run's miles or its kWh, not both: leave one of the two empty";
    }
    const candidate = {
      busNumber: col(row, 'bus'),
      pullOut: pullOut ?? '',
      pullIn: pullIn ?? '',
      miles,
      kwh,
      arrivalSocPct: num('arrival_soc_pct'),
    };
    const parsed = runInputSchema.safeParse(candidate);
    const before = Object.keys(fields).some((f) => f.startsWith(`line ${line}.`));
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const field = csvField(fieldPath(issue.path));
        // A time already named in the file's own format keeps that message.
        if ((field === 'pull_out' && !pullOut) || (field === 'pull_in' && !pullIn)) continue;
        fields[at(field)] ??= issue.message;
      }
      return;
    }
    if (before) return;
    runs.push(parsed.data);
    lines.push(line);
  });
  if (!runs.length && !Object.keys(fields).length) {
    throw new DomainError('validation_failed', 'The file has no runs below its header', { file: 'No rows' });
  }
  return { runs, lines, problems: fields };
}
