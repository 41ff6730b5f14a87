import { Injectable, type Signal, computed, inject, linkedSignal, resource, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl } from '@angular/forms';
import { MatSnackBar } from '@angular/material/snack-bar';
import { coldWeatherFactor, type ColdWeatherTable, type ServiceDay } from '@nightyard/contracts';
import { startWith } from 'rxjs';
import { toApiProblem } from '../core/api-error';
import { addDays, isIsoDate } from '@nightyard/contracts/depot-time';
import { formatServiceDay } from '../depot-state/depot-format';
import { DepotListStore } from '../depot-state/depot-list-store';
import { NightStore } from '../depot-state/night-store';
import type { ProblemItem } from '../shared/problem-summary';
import { readFileText } from '../core/save-file';
import { applyPathErrors } from './field-paths';
import { FleetApi } from './fleet-api';
import { csvProblems } from './fleet-format';
import { runInputOf, runRow, serviceDayForm } from './run-rows';

const FIELD_NAMES: Record<string, string> = {
  busNumber: 'bus',
  pullOut: 'pull-out',
  pullIn: 'pull-in',
  miles: 'miles',
  kwh: 'kWh',
  arrivalSocPct: 'state of charge on arrival',
  forecastLowF: 'Forecast low',
  fromDate: 'Copy from',
};

/** The weekday before `date` (Friday for a Monday): the usual day to copy runs from. */
export function previousWeekday(date: string): string {
  let d = addDays(date, -1);
  while ([0, 6].includes(new Date(`${d}T00:00:00Z`).getUTCDay())) d = addDays(d, -1);
  return d;
}

/** What a copy asks when the day already has runs: replace them? (answered by the page). */
export type AskReplace = (question: { from: string; message: string }) => Promise<boolean>;

const none: Signal<undefined> = signal(undefined);

/**
 * Fleet > Service day's state: the day shown, its runs (in a form for editors), the depot's buses
 * and cold-weather bands, and the actions (save, upload, copy). Provided by the page.
 */
@Injectable()
export class ServiceDayStore {
  private readonly api = inject(FleetApi);
  private readonly depots = inject(DepotListStore);
  private readonly nights = inject(NightStore);
  private readonly snackBar = inject(MatSnackBar);

  private readonly date = signal<Signal<string | undefined>>(none);
  readonly depot = this.depots.current;

  /** The service day shown; '' until the server has said which night it is (the page shows progress). */
  readonly day = computed(() => {
    const d = this.date()();
    if (isIsoDate(d)) return d;
    const depot = this.depot();
    return (depot && this.nights.tonightOf(depot)) ?? '';
  });
  readonly dayText = computed(() => formatServiceDay(this.day()));

  readonly form = serviceDayForm();
  readonly copyFrom = new FormControl('', { nonNullable: true });

  /** Tonight at the depot, when no day is asked for. */
  readonly tonight = resource({
    params: () => (this.depot() && !this.day() ? this.depot()! : undefined),
    loader: ({ params }) => this.nights.load(params),
  });

  /** The depot's buses and cold-weather bands (asked once a depot). */
  private readonly fleet = resource({
    params: () => this.depot()?.id,
    loader: ({ params: depotId }) => Promise.all([this.api.buses(depotId), this.api.coldWeather(depotId)]),
  });
  private readonly dayKey = computed(
    () => {
      const depotId = this.depot()?.id;
      const day = this.day();
      return depotId && day ? { depotId, day } : undefined;
    },
    { equal: (a, b) => a?.depotId === b?.depotId && a?.day === b?.day },
  );
  /** The day's runs as the API has them; each answer is put in the form. */
  private readonly loaded = resource({
    params: () => this.dayKey(),
    loader: async ({ params }) => {
      this.clearProblems();
      this.copyFrom.setValue(previousWeekday(params.day));
      const day = await this.api.serviceDay(params.depotId, params.day);
      this.fill(day);
      return day;
    },
  });

  readonly serviceDay = computed(() => (this.loaded.hasValue() ? this.loaded.value() : null));
  readonly buses = computed(() => (this.fleet.hasValue() ? this.fleet.value()[0] : []));
  /** The bands as loaded, or as just saved. */
  readonly bands = linkedSignal<ColdWeatherTable>(() => (this.fleet.hasValue() ? this.fleet.value()[1] : []));

  private readonly depotsDone = computed(() => ['loaded', 'failed'].includes(this.depots.state()));
  readonly loading = computed(() => {
    if (!this.depot()) return !this.depotsDone();
    return !this.day() || this.loaded.isLoading() || this.fleet.isLoading();
  });
  readonly loadProblem = computed(() => {
    if (!this.depot())
      return this.depotsDone() ? (this.depots.error() ?? 'No depot has been set up for your organisation yet.') : null;
    const err = this.loaded.error() ?? this.fleet.error();
    return err ? toApiProblem(err).message : null;
  });

  readonly busy = signal<string | null>(null);
  readonly problem = signal<string | null>(null);
  readonly problems = signal<ProblemItem[]>([]);
  readonly problemsLabel = signal('Problems to fix');

  private readonly lowF = toSignal(this.form.controls.forecastLowF.valueChanges.pipe(startWith(null)));
  readonly factor = computed(() => {
    this.lowF();
    const low = this.form.controls.forecastLowF.value;
    return coldWeatherFactor(this.bands(), low === null || (low as unknown) === '' ? null : Number(low));
  });
  readonly busNumbers = computed(() =>
    [...this.buses()]
      .sort((a, b) => a.number.localeCompare(b.number, undefined, { numeric: true }))
      .map((b) => b.number),
  );

  constructor() {
    void this.depots.load();
  }

  /** Binds the page's `date` query parameter. */
  bind(date: Signal<string | undefined>): void {
    this.date.set(date);
  }

  /** Asks for the day again (and the buses and bands, if they failed). */
  reload(): void {
    if (this.fleet.error()) this.fleet.reload();
    this.loaded.reload();
  }

  /** The day as the API has it, in the table and the form. */
  private show(day: ServiceDay): void {
    this.loaded.set(day);
    this.fill(day);
  }

  private fill(day: ServiceDay): void {
    this.form.controls.forecastLowF.setValue(day.forecastLowF);
    this.form.controls.runs.clear();
    for (const run of day.runs) this.form.controls.runs.push(runRow(run));
    this.form.markAsPristine();
    this.form.markAsUntouched();
  }

  clearProblems(): void {
    this.problem.set(null);
    this.problems.set([]);
  }

  addRun(): void {
    this.form.controls.runs.push(runRow());
    this.form.markAsDirty();
  }

  removeRun(i: number): void {
    this.form.controls.runs.removeAt(i);
    this.form.markAsDirty();
  }

  discard(): void {
    const day = this.serviceDay();
    if (day) this.fill(day);
    this.clearProblems();
  }

  private lowOrNull(): number | null {
    const c = this.form.controls.forecastLowF;
    return c.valid && c.value !== null && (c.value as unknown) !== '' ? Number(c.value) : null;
  }

  /** Saves the runs; false when the form has errors (nothing sent). */
  async save(): Promise<boolean> {
    const depotId = this.depot()?.id;
    if (!depotId || this.busy()) return true;
    this.clearProblems();
    this.problemsLabel.set('Rows to fix');
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.problem.set('Some values need fixing (marked in the table); nothing was saved.');
      return false;
    }
    const day = this.day();
    const body = {
      forecastLowF: this.lowOrNull(),
      runs: this.form.controls.runs.controls.map((r) => runInputOf(r, day)),
    };
    this.busy.set('Saving the runs');
    try {
      this.show(await this.api.saveServiceDay(depotId, day, body));
      this.snackBar.open(`Runs of ${this.dayText()} saved`, 'OK');
    } catch (err) {
      const p = toApiProblem(err);
      this.problem.set(p.message);
      this.problems.set(applyPathErrors(this.form, p.fields, FIELD_NAMES));
    } finally {
      this.busy.set(null);
    }
    return true;
  }

  async upload(file: File): Promise<void> {
    const depotId = this.depot()?.id;
    if (!depotId || this.busy()) return;
    this.clearProblems();
    this.problemsLabel.set('Lines to fix');
    this.busy.set(`Uploading ${file.name}`);
    try {
      const text = await readFileText(file);
      const day = await this.api.uploadRunsCsv(depotId, this.day(), text, this.lowOrNull());
      this.show(day);
      this.snackBar.open(`${day.runs.length} runs uploaded from ${file.name}`, 'OK');
    } catch (err) {
      const p = toApiProblem(err);
      // A fault of the whole file (a NUL in a binary file) is the message itself: not listed again.
      const whole = p.fields['csv'];
      this.problem.set(`${file.name}: ${whole ?? p.message}`);
      this.problems.set(
        csvProblems(Object.fromEntries(Object.entries(p.fields).filter(([key]) => key !== 'csv'))).map((x) => ({
          where: x.line === null ? (x.column === 'file' ? 'File' : x.column) : `Line ${x.line}, column ${x.column}`,
          message: x.message,
        })),
      );
    } finally {
      this.busy.set(null);
    }
  }

  /** The runs CSV template of the day; null when refused (the problem is shown). */
  async template(): Promise<Blob | null> {
    const depotId = this.depot()?.id;
    if (!depotId) return null;
    this.clearProblems();
    try {
      return await this.api.runsCsvTemplate(depotId, this.day());
    } catch (err) {
      this.problem.set(toApiProblem(err).message);
      return null;
    }
  }

  /** Copies the runs of `copyFrom`; when the day has runs, `askReplace` decides whether they are replaced. */
  async copy(askReplace: AskReplace, replace = false): Promise<void> {
    const depotId = this.depot()?.id;
    const from = this.copyFrom.value;
    if (!depotId || this.busy()) return;
    this.clearProblems();
    if (!isIsoDate(from)) {
      this.problem.set('Choose the day to copy the runs from.');
      return;
    }
    this.busy.set(`Copying the runs of ${formatServiceDay(from)}`);
    try {
      const day = await this.api.copyServiceDay(depotId, this.day(), from, replace);
      this.show(day);
      this.snackBar.open(`${day.runs.length} runs copied from ${formatServiceDay(from)}`, 'OK');
    } catch (err) {
      const p = toApiProblem(err);
      if (p.status === 409 && !replace) {
        this.busy.set(null);
        if (await askReplace({ from, message: p.message })) await this.copy(askReplace, true);
        return;
      }
      this.problem.set(p.message);
      this.problems.set(applyPathErrors(this.form, p.fields, FIELD_NAMES));
    } finally {
      if (this.busy()?.startsWith('Copying')) this.busy.set(null);
    }
  }

  bandsSaved(bands: ColdWeatherTable): void {
    this.bands.set(bands);
    this.snackBar.open('Cold-weather factors saved; estimates use them from now on', 'OK');
    if (!this.form.dirty) this.loaded.reload();
  }
}
