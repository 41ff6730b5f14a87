import { parse } from 'csv-parse/sync';
import { MAX_RUNS_PER_DAY, runInputSchema, type RunInput } from '@nightyard/contracts';
import { DomainError } from '../http/errors';
import { issuePath } from '../http/validate';

/** Columns of a service day's runs file; the template lists them with two example rows. */
export const RUN_COLUMNS = ['bus', 'pull_out', 'pull_in', 'miles', 'kwh', 'arrival_soc_pct'] as const;

export function runsCsvTemplate(date: string): string {
  return [
    RUN_COLUMNS.join(','),
    `201,06:10,08:25,31.5,,`,
    `201,14:05,16:30,,42,38`,
  ].join('\r\n') + '\r\n';
}

const FIELD_FOR: Record<string, string> = {
  busNumber: 'bus', pullOut: 'pull_out', pullIn: 'pull_in', miles: 'miles', kwh: 'kwh', arrivalSocPct: 'arrival_soc_pct', bus: 'bus',
};

export const csvField = (field: string) => FIELD_FOR[field] ?? field;

/**
 * Reads a runs file for one service day. Times may be `HH:mm` (on the service day; a pull-in
 * earlier than its pull-out is the next morning) or `YYYY-MM-DD HH:mm`. Every bad row is
 * reported with its line number and column; nothing is returned unless all rows are good.
 */
export function parseRunsCsv(text: string, date: string): { runs: RunInput[]; lines: number[] } {
  let records: string[][];
  let lineOf: number[];
  try {
    const parsed = parse(text.replace(/^\uFEFF/, ''), { skip_empty_lines: true, trim: true, relax_column_count: true, info: true }) as unknown as
      { record: string[]; info: { lines: number } }[];
    records = parsed.map((p) => p.record);
    lineOf = parsed.map((p) => p.info.lines);
  } catch (e) {
    throw new DomainError('validation_failed', `The file is not readable CSV: ${(e as Error).message}`, { file: 'Not valid CSV' });
  }
  const [header, ...rows] = records;
  const columns = (header ?? []).map((h) => h.toLowerCase());
  const missing = RUN_COLUMNS.filter((c) => c !== 'kwh' && c !== 'miles' && c !== 'arrival_soc_pct' && !columns.includes(c));
  const unknown = columns.filter((c) => !(RUN_COLUMNS as readonly string[]).includes(c));
  if (missing.length || unknown.length) {
    const fields: Record<string, string> = {};
    const at = lineOf[0] ?? 1;
    for (const c of missing) fields[`line ${at}.${c}`] = `Column "${c}" is missing: start from the template`;
    for (const c of unknown) fields[`line ${at}.${c}`] = `Unknown column "${c}": the columns are ${RUN_COLUMNS.join(', ')}`;
    throw new DomainError('validation_failed', 'The header line does not match the template', fields);
  }
  if (rows.length > MAX_RUNS_PER_DAY) {
    throw new DomainError('payload_too_large', `The file has ${rows.length} runs; a service day holds at most ${MAX_RUNS_PER_DAY}: nothing was saved`, {
      file: `At most ${MAX_RUNS_PER_DAY} rows below the header`,
    });
  }
  const col = (row: string[], name: string) => row[columns.indexOf(name)]?.trim() ?? '';
  const fields: Record<string, string> = {};
  const runs: RunInput[] = [];
  const lines: number[] = [];
  rows.forEach((row, k) => {
    const line = lineOf[k + 1]!;
    const time = (v: string, base: string) => {
      if (/^\d{1,2}:\d{2}$/.test(v)) return `${base}T${v.padStart(5, '0')}`;
      if (/^\d{4}-\d{2}-\d{2}[ T]\d{2}:\d{2}$/.test(v)) return v.replace(' ', 'T');
      return v;
    };
    const num = (v: string, name: string) => {
      if (v === '') return null;
      const n = Number(v);
      if (!Number.isFinite(n)) fields[`line ${line}.${name}`] ??= `"${v}" is not a number`;
      return n;
    };
    const pullOut = time(col(row, 'pull_out'), date);
    let pullIn = time(col(row, 'pull_in'), date);
    if (/^\d{1,2}:\d{2}$/.test(col(row, 'pull_in')) && pullIn <= pullOut) {
      // An HH:mm pull-in before the pull-out is the next morning.
      const next = new Date(`${date}T00:00:00Z`);
      next.setUTCDate(next.getUTCDate() + 1);
      pullIn = `${next.toISOString().slice(0, 10)}T${col(row, 'pull_in').padStart(5, '0')}`;
    }
    const candidate = {
      busNumber: col(row, 'bus'), pullOut, pullIn,
      miles: num(col(row, 'miles'), 'miles'), kwh: num(col(row, 'kwh'), 'kwh'), arrivalSocPct: num(col(row, 'arrival_soc_pct'), 'arrival_soc_pct'),
    };
    const parsed = runInputSchema.safeParse(candidate);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        fields[`line ${line}.${csvField(issuePath(issue.path))}`] ??= issue.message;
      }
      return;
    }
    runs.push(parsed.data);
    lines.push(line);
  });
  if (Object.keys(fields).length) {
    const bad = new Set(Object.keys(fields).map((f) => f.split('.')[0]));
    throw new DomainError('validation_failed', `${bad.size} ${bad.size === 1 ? 'line needs' : 'lines need'} fixing; nothing was saved`, fields);
  }
  if (!runs.length) throw new DomainError('validation_failed', 'The file has no runs below its header', { file: 'No rows' });
  return { runs, lines };
}
