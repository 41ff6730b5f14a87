import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
} from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { ActivatedRoute, Router } from '@angular/router';
import { coldWeatherFactor, type Bus, type ColdWeatherTable, type ServiceDay } from '@nightyard/contracts';
import { firstValueFrom, startWith } from 'rxjs';
import { toApiProblem } from '../core/api-error';
import { formatServiceDay } from '../depot-state/depot-format';
import { addDays, isIsoDate } from '@nightyard/contracts/depot-time';
import { DepotListStore } from '../depot-state/depot-list-store';
import { NightStore } from '../depot-state/night-store';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';
import { ClockTimeInput } from '../shared/clock-time-input';
import { SectionIntro } from '../sections/section-intro';
import { messageOf } from './bus-form';
import { ColdWeatherPanel } from './cold-weather-panel';
import { injectSaveFile, readFileText } from '../core/save-file';
import { applyPathErrors } from './field-paths';
import { FleetApi } from './fleet-api';
import { injectCanEditFleet } from '../auth/role-checks';
import { SOC_SOURCE_LABELS, clockOf, csvProblems, fmt1 } from './fleet-format';
import { FleetTabs } from './fleet-tabs';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { pullInNextDay, pullInText, runInputOf, runRow, serviceDayForm, socSourceText, type RunRow } from './run-rows';

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

/** Fleet > Service day: a day's runs and arrival states of charge, typed, copied or uploaded. */
@Component({
  selector: 'ny-service-day-page',
  imports: [
    ClockTimeInput,
    ColdWeatherPanel,
    FleetTabs,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    ProblemSummary,
    ReactiveFormsModule,
    SectionIntro,
  ],
  templateUrl: './service-day-page.html',
  styleUrl: './service-day-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class ServiceDayPage {
  private readonly api = inject(FleetApi);
  private readonly depots = inject(DepotListStore);
  private readonly nights = inject(NightStore);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly saveFile = injectSaveFile();

  /** The `date` query parameter (YYYY-MM-DD); without it, tonight's service day as the server says. */
  readonly date = input<string>();

  protected readonly canEdit = injectCanEditFleet();
  protected readonly depot = this.depots.current;
  /** The service day shown; '' until the server has said which night it is (the page shows progress). */
  protected readonly day = computed(() => {
    const d = this.date();
    if (isIsoDate(d)) return d;
    const depot = this.depot();
    return (depot && this.nights.tonightOf(depot)) ?? '';
  });
  protected readonly dayText = computed(() => formatServiceDay(this.day()));

  protected readonly buses = signal<Bus[]>([]);
  protected readonly bands = signal<ColdWeatherTable>([]);
  protected readonly serviceDay = signal<ServiceDay | null>(null);
  protected readonly loading = signal(true);
  protected readonly loadProblem = signal<string | null>(null);
  protected readonly busy = signal<string | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly problems = signal<ProblemItem[]>([]);
  protected readonly problemsLabel = signal('Problems to fix');

  protected readonly form = serviceDayForm();
  protected readonly copyFrom = new FormControl('', { nonNullable: true });
  private readonly lowF = toSignal(this.form.controls.forecastLowF.valueChanges.pipe(startWith(null)));
  protected readonly factor = computed(() => {
    this.lowF();
    const low = this.form.controls.forecastLowF.value;
    return coldWeatherFactor(this.bands(), low === null || (low as unknown) === '' ? null : Number(low));
  });
  protected readonly busNumbers = computed(() =>
    [...this.buses()].sort((a, b) => a.number.localeCompare(b.number, undefined, { numeric: true })).map((b) => b.number),
  );
  protected readonly busCount = computed(() => new Set(this.serviceDay()?.runs.map((r) => r.busId)).size);

  protected readonly messageOf = messageOf;
  protected readonly fmt1 = fmt1;
  protected readonly clockOf = clockOf;
  protected readonly pullInText = pullInText;
  protected readonly pullInNextDay = pullInNextDay;
  protected readonly socSourceText = socSourceText;
  protected readonly sourceLabels = SOC_SOURCE_LABELS;

  private loadSeq = 0;
  private loadedDepot: string | null = null;

  constructor() {
    void this.depots.load();
    effect(() => {
      const depot = this.depot();
      const day = this.day();
      if (!depot) {
        if (this.depots.state() === 'loaded' || this.depots.state() === 'failed') {
          this.loading.set(false);
          this.loadProblem.set(this.depots.error() ?? 'No depot has been set up for your organisation yet.');
        }
        return;
      }
      if (!day) {
        untracked(() => void this.nights.load(depot));
        return;
      }
      untracked(() => void this.load(depot.id, day));
    });
  }

  protected get rows(): RunRow[] {
    return this.form.controls.runs.controls;
  }

  protected async load(depotId = this.depot()?.id, day = this.day()): Promise<void> {
    if (!depotId) return;
    const seq = ++this.loadSeq;
    this.loading.set(true);
    this.loadProblem.set(null);
    this.clearProblems();
    this.copyFrom.setValue(previousWeekday(day));
    try {
      const fleet = this.loadedDepot === depotId ? null : Promise.all([this.api.buses(depotId), this.api.coldWeather(depotId)]);
      const [serviceDay, extra] = await Promise.all([this.api.serviceDay(depotId, day), fleet]);
      if (seq !== this.loadSeq) return;
      if (extra) {
        this.buses.set(extra[0]);
        this.bands.set(extra[1]);
        this.loadedDepot = depotId;
      }
      this.show(serviceDay);
    } catch (err) {
      if (seq === this.loadSeq) this.loadProblem.set(toApiProblem(err).message);
    } finally {
      if (seq === this.loadSeq) this.loading.set(false);
    }
  }

  /** The day as the API has it, in the table and the form. */
  private show(day: ServiceDay): void {
    this.serviceDay.set(day);
    this.form.controls.forecastLowF.setValue(day.forecastLowF);
    this.form.controls.runs.clear();
    for (const run of day.runs) this.form.controls.runs.push(runRow(run));
    this.form.markAsPristine();
    this.form.markAsUntouched();
  }

  private clearProblems(): void {
    this.problem.set(null);
    this.problems.set([]);
  }

  /** Asked by the route before leaving the page: unsaved changes to the runs are confirmed first. */
  canLeave(): boolean | Promise<boolean> {
    if (!this.canEdit() || !this.form.dirty) return true;
    return this.confirm({
      title: 'Leave without saving?',
      message: `The changes to the runs of ${this.dayText()} are not saved. They are lost if you leave this page.`,
      confirm: 'Discard changes',
    });
  }

  protected goTo(date: string, field?: HTMLInputElement): void {
    if (!isIsoDate(date) || date === this.day()) return;
    const go = () => void this.router.navigate([], { relativeTo: this.route, queryParams: { date }, queryParamsHandling: 'merge' });
    if (!this.canEdit() || !this.form.dirty) {
      go();
      return;
    }
    this.confirm({
      title: 'Leave without saving?',
      message: `The changes to the runs of ${this.dayText()} are not saved. They are lost if you open another day.`,
      confirm: 'Discard changes',
    }).then((yes) => {
      if (yes) go();
      else if (field) field.value = this.day();
    });
  }

  protected step(days: number): void {
    this.goTo(addDays(this.day(), days));
  }

  protected addRun(): void {
    this.form.controls.runs.push(runRow());
    this.form.markAsDirty();
    queueMicrotask(() => {
      const selects = this.host.nativeElement.querySelectorAll<HTMLElement>('tbody tr:last-child mat-select');
      selects[selects.length - 1]?.focus();
    });
  }

  protected removeRun(i: number): void {
    this.form.controls.runs.removeAt(i);
    this.form.markAsDirty();
  }

  protected discard(): void {
    const day = this.serviceDay();
    if (day) this.show(day);
    this.clearProblems();
  }

  private lowOrNull(): number | null {
    const c = this.form.controls.forecastLowF;
    return c.valid && c.value !== null && (c.value as unknown) !== '' ? Number(c.value) : null;
  }

  protected async save(): Promise<void> {
    const depotId = this.depot()?.id;
    if (!depotId || this.busy()) return;
    this.clearProblems();
    this.problemsLabel.set('Rows to fix');
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.problem.set('Some values need fixing (marked in the table); nothing was saved.');
      queueMicrotask(() => this.host.nativeElement.querySelector<HTMLElement>('form input.ng-invalid, form mat-select.ng-invalid')?.focus());
      return;
    }
    const day = this.day();
    const body = { forecastLowF: this.lowOrNull(), runs: this.rows.map((r) => runInputOf(r, day)) };
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
  }

  protected async upload(fileInput: HTMLInputElement): Promise<void> {
    const file = fileInput.files?.[0];
    const depotId = this.depot()?.id;
    fileInput.value = '';
    if (!file || !depotId || this.busy()) return;
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
      this.problem.set(`${file.name}: ${p.message}`);
      this.problems.set(
        csvProblems(p.fields).map((x) => ({
          where: x.line === null ? (x.column === 'file' ? 'File' : x.column) : `Line ${x.line}, column ${x.column}`,
          message: x.message,
        })),
      );
    } finally {
      this.busy.set(null);
    }
  }

  protected async downloadTemplate(): Promise<void> {
    const depotId = this.depot()?.id;
    if (!depotId) return;
    this.clearProblems();
    try {
      const blob = await this.api.runsCsvTemplate(depotId, this.day());
      this.saveFile(blob, `runs-${this.day()}.csv`);
    } catch (err) {
      this.problem.set(toApiProblem(err).message);
    }
  }

  protected async copy(replace = false): Promise<void> {
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
        const yes = await this.confirm({
          title: `Replace the runs of ${this.dayText()}?`,
          message: `${p.message}. The runs of ${formatServiceDay(from)} take their place at the same times; states of charge on arrival are not copied.`,
          confirm: 'Replace runs',
        });
        if (yes) await this.copy(true);
        return;
      }
      this.problem.set(p.message);
      this.problems.set(applyPathErrors(this.form, p.fields, FIELD_NAMES));
    } finally {
      if (this.busy()?.startsWith('Copying')) this.busy.set(null);
    }
  }

  protected onBandsSaved(bands: ColdWeatherTable): void {
    this.bands.set(bands);
    this.snackBar.open('Cold-weather factors saved; estimates use them from now on', 'OK');
    if (!this.form.dirty) void this.load();
  }

  private confirm(data: ConfirmData): Promise<boolean> {
    return firstValueFrom(
      this.dialog.open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '460px', maxWidth: '95vw' }).afterClosed(),
    ).then((r) => r === true);
  }
}
