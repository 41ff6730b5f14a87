import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { MeterImportResult } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { CostsApi } from './costs-api';
import { kw, localTime, num } from './costs-format';

/** The API takes up to 20 MB of file text. */
const MAX_FILE_BYTES = 20_000_000;
const ACCEPTED = /\.(xml|csv)$/i;
/** Field keys whose text only repeats the API's message ("Mixed lengths", "No rate plan"). */
const REPEATED = new Set(['intervals', 'date']);

let nextId = 0;

/** A field key of the API's message in words: "line 12.UNITS" -> "Line 12, UNITS". */
export function whereText(key: string): string {
  const line = /^line (\d+)(?:\.(.+))?$/.exec(key);
  if (line) return line[2] ? `Line ${line[1]}, ${line[2]}` : `Line ${line[1]}`;
  const reading = /^IntervalReading\[(\d+)\]\.(.+)$/.exec(key);
  if (reading) return `Reading ${reading[1]}, ${reading[2]}`;
  if (/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}$/.test(key)) return `Interval starting ${key}`;
  if (key === 'file') return 'File';
  return key;
}

/**
 * Imports the utility's interval data (Green Button XML or CSV) for the billing period shown:
 * all or nothing. Shows what came in (intervals, gaps, duplicates, the peaks so far now), or
 * what is wrong with the file.
 */
@Component({
  selector: 'ny-meter-import-panel',
  imports: [MatIconModule, MatProgressBarModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  templateUrl: './meter-import-panel.html',
  styleUrl: './meter-import-panel.scss',
})
export class MeterImportPanel {
  private readonly api = inject(CostsApi);

  readonly depotId = input.required<string>();
  /** The billing period's first day (YYYY-MM-DD): the API checks every reading lies in it. */
  readonly periodStart = input.required<string>();
  /** The billing period by name, for the messages. */
  readonly periodName = input.required<string>();
  /** After a successful import: the page reloads the month. */
  readonly imported = output<MeterImportResult>();

  protected readonly id = `ny-meter-file-${nextId++}`;
  protected readonly busy = signal(false);
  private readonly outcome = signal<
    | { kind: 'done'; periodStart: string; fileName: string; result: MeterImportResult }
    | {
        kind: 'failed';
        periodStart: string;
        fileName: string;
        message: string;
        items: { where: string; message: string }[];
      }
    | null
  >(null);

  /** The last outcome, for the billing period shown only. */
  protected readonly shown = computed(() => {
    const o = this.outcome();
    return o && o.periodStart === this.periodStart() ? o : null;
  });

  protected readonly done = computed(() => {
    const o = this.shown();
    if (o?.kind !== 'done') return null;
    const r = o.result;
    const format =
      r.format === 'green-button-xml'
        ? 'Green Button XML'
        : r.format === 'green-button-csv'
          ? 'Green Button CSV'
          : r.format;
    return {
      fileName: o.fileName,
      summary: `${num(r.intervals, 0)} ${r.intervals === 1 ? 'interval' : 'intervals'} of ${num(r.minutes, 0)} minutes (${format}), ${num(r.kwh, 1)} kWh in all.`,
      duplicates:
        r.duplicates === 0
          ? 'No duplicate readings.'
          : `${r.duplicates} duplicate ${r.duplicates === 1 ? 'reading' : 'readings'} with the same value, counted once.`,
      gaps: r.gaps.map((g) => ({
        from: localTime(g.from),
        // The same day: the end as a time only ("Wed, Dec 2, 22:45 to 23:00").
        to: g.to.slice(0, 10) === g.from.slice(0, 10) ? g.to.slice(11, 16) : localTime(g.to),
      })),
      peaks: [
        `facility ${kw(r.peaks.facilityKw)}`,
        ...Object.entries(r.peaks.periods).map(([name, value]) => `${name} ${kw(value)}`),
      ].join(', '),
    };
  });

  protected readonly failed = computed(() => {
    const o = this.shown();
    return o?.kind === 'failed' ? o : null;
  });

  protected async onFile(event: Event): Promise<void> {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    const periodStart = this.periodStart();
    const fail = (message: string, items: { where: string; message: string }[] = []) =>
      this.outcome.set({ kind: 'failed', periodStart, fileName: file.name, message, items });
    this.outcome.set(null);
    if (!ACCEPTED.test(file.name)) {
      fail(`${file.name} was not imported: choose a Green Button XML (.xml) or CSV (.csv) file. Nothing was imported.`);
      return;
    }
    if (file.size > MAX_FILE_BYTES) {
      fail(
        `${file.name} was not imported: it is larger than 20 MB. Export one billing period at a time. Nothing was imported.`,
      );
      return;
    }
    this.busy.set(true);
    try {
      const content = await readText(file);
      if (!content.trim()) {
        fail(`${file.name} was not imported: the file is empty. Nothing was imported.`);
        return;
      }
      const result = await this.api.importMeterData(this.depotId(), {
        fileName: file.name,
        content,
        billingPeriodStart: periodStart,
      });
      this.outcome.set({ kind: 'done', periodStart, fileName: file.name, result });
      this.imported.emit(result);
    } catch (err) {
      const p = toApiProblem(err);
      // Ends with the API's own "?" or "!", else a full stop (not "export?.").
      const message = /[?!]\s*$/.test(p.message) ? p.message.trim() : `${p.message.replace(/[.\s]+$/, '')}.`;
      const outside = p.fields['intervals'] === 'Outside the billing period';
      const advice = outside ? ` Choose the billing period the file is for, or export ${this.periodName()} only.` : '';
      const nothing = /nothing was imported/i.test(message) ? '' : ' Nothing was imported.';
      fail(
        `${file.name} was not imported. ${message}${advice}${nothing}`,
        Object.entries(p.fields)
          // Nor a field's text the message already says ("Check text: ... contains a NUL").
          .filter(([key, text]) => !REPEATED.has(key) && !message.includes(text))
          .map(([key, text]) => ({ where: whereText(key), message: text })),
      );
    } finally {
      this.busy.set(false);
    }
  }
}

function readText(file: Blob): Promise<string> {
  if (typeof file.text === 'function') return file.text();
  return new Promise((resolve, reject) => {
    const reader = new FileReader();
    reader.onload = () => resolve(String(reader.result ?? ''));
    reader.onerror = () => reject(reader.error ?? new Error('The file could not be read'));
    reader.readAsText(file);
  });
}
