import type { BusInput } from '@nightyard/contracts';

/** "2026-12-03T06:10" -> "06:10". */
export function clockOf(local: string): string {
  return local.slice(11, 16);
}

/** "2026-12-03T06:10" -> "2026-12-03". */
export function dateOf(local: string): string {
  return local.slice(0, 10);
}

export const BUS_STATUS_LABELS: Record<BusInput['status'], string> = {
  active: 'In service',
  out_of_service: 'Out of service',
  retired: 'Retired',
};

export const SOC_SOURCE_LABELS = {
  typed: 'Typed',
  uploaded: 'Uploaded',
  estimated: 'Estimated',
  charger: 'Read by charger',
} as const;

const number1 = new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 });
const number2 = new Intl.NumberFormat(undefined, { maximumFractionDigits: 2 });

export function fmt1(value: number): string {
  return number1.format(value);
}

export function fmt2(value: number): string {
  return number2.format(value);
}

/** One bad value of an uploaded CSV file: its line, its column and what to fix. */
export interface CsvProblem {
  line: number | null;
  column: string;
  message: string;
}

const LINE_FIELD = /^line (\d+)\.(.+)$/;

/**
 * The API names each bad CSV value `line 5.pull_in`; this lists them by line, then column,
 * with problems of the whole file (no line) first.
 */
export function csvProblems(fields: Record<string, string>): CsvProblem[] {
  return Object.entries(fields)
    .map(([path, message]) => {
      const m = LINE_FIELD.exec(path);
      return m ? { line: Number(m[1]), column: m[2]!, message } : { line: null, column: path, message };
    })
    .sort((a, b) => (a.line ?? -1) - (b.line ?? -1) || a.column.localeCompare(b.column));
}
