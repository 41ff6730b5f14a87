import { injectSaveFile } from '../core/save-file';

/** A CSV cell: text, a plain number (no grouping, no currency sign) or empty. */
export type CsvValue = string | number | null | undefined;

/** A table ready for CSV: its header row and its data rows. */
export interface CsvTable {
  header: readonly string[];
  rows: readonly (readonly CsvValue[])[];
}

/** Text a spreadsheet would run as a formula (OWASP "CSV injection"): kept as text. */
const FORMULA_START = /^[=+\-@\t\r]/;

/** One cell as RFC 4180 writes it: quoted when it holds a comma, quote or line break. */
export function csvCell(value: CsvValue): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) return '';
    // Plain digits, no exponent for ordinary amounts; float noise (0.30000000000000004) cut off.
    const rounded = Number(value.toFixed(6));
    return String(Object.is(rounded, -0) ? 0 : rounded);
  }
  let text = value;
  if (FORMULA_START.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) || text !== text.trim() ? `"${text.replace(/"/g, '""')}"` : text;
}

/** The whole file: a header row, then each row; CRLF line ends (RFC 4180), ending with one. */
export function buildCsv(table: CsvTable): string {
  const width = table.header.length;
  const lines = [table.header.map(csvCell).join(',')];
  for (const row of table.rows) {
    const cells = Array.from({ length: width }, (_, i) => csvCell(row[i]));
    lines.push(cells.join(','));
  }
  return `${lines.join('\r\n')}\r\n`;
}

/** Returns a function that saves text as a CSV file. Call in an injection context. */
export function injectSaveCsv(): (fileName: string, text: string) => void {
  const save = injectSaveFile();
  return (fileName, text) => save(new Blob([text], { type: 'text/csv;charset=utf-8' }), fileName);
}
