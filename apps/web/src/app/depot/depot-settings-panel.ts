import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  inject,
  input,
  output,
  signal,
  type OnInit,
} from '@angular/core';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatRadioModule } from '@angular/material/radio';
import { MatSnackBar } from '@angular/material/snack-bar';
import { depotSettingsSchema, type DepotDetail, type DepotSettings } from '@nightyard/contracts';
import { startWith } from 'rxjs';
import { toApiProblem } from '../core/api-error';
import { FormDrafts } from '../core/form-drafts';
import { applyServerErrors, errorText, zodValidator } from '../shared/form-paths';
import { PlausibleConfirm } from '../shared/plausible-confirm';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { DepotApi } from './depot-api';
import { HOUR_LABELS, formatKw, timeZones } from './depot-setup-format';
import { trackUnsaved } from '../core/unsaved-edits';

/** The name its unsaved input is kept under when the session ends (FormDrafts). */
const DRAFT = 'depot-settings';
/** A bus depot's connection above this is most likely a typing slip (kW). */
export const PLAUSIBLE_SERVICE_KW = 50_000;

/**
 * Why a service limit is unlikely, or null: above 50 MW, at or below the depot's other load (no
 * charging at all in its busiest hour), or below the largest charger.
 */
export function serviceLimitWarning(kw: number | null, largestChargerKw: number, otherLoadKw = 0): string | null {
  if (kw === null || !(kw > 0)) return null;
  if (kw > PLAUSIBLE_SERVICE_KW) {
    return `${formatKw(kw)} is above 50 MW, far more than a bus depot's connection: check the figure (kW, not W).`;
  }
  if (otherLoadKw >= kw)
    return `${formatKw(kw)} is no more than the depot's other load (${formatKw(otherLoadKw)} at its highest): no bus could charge then. Check the figure.`;
  if (largestChargerKw > kw)
    return `${formatKw(kw)} is below the depot's largest charger (${formatKw(largestChargerKw)}). Check the figure.`;
  return null;
}
const shape = depotSettingsSchema.shape;
const loadControl = (kw: number | null) =>
  new FormControl<number | null>(kw, zodValidator(shape.otherLoadKw.element, 'Enter the other load in kW (0 if none)'));

function settingsForm(d: DepotDetail) {
  return new FormGroup({
    name: new FormControl(d.name, { nonNullable: true, validators: zodValidator(shape.name, 'Name the depot') }),
    timezone: new FormControl(d.timezone, {
      nonNullable: true,
      validators: zodValidator(shape.timezone, 'Choose an IANA time zone such as America/Chicago'),
    }),
    serviceLimitKw: new FormControl<number | null>(
      d.serviceLimitKw,
      zodValidator(shape.serviceLimitKw, 'Enter the service limit in kW'),
    ),
    billingStartDay: new FormControl<number | null>(
      d.billingStartDay,
      zodValidator(shape.billingStartDay, 'Enter a day from 1 to 28'),
    ),
    otherLoadMode: new FormControl<'flat' | 'profile'>(d.otherLoadKw.length === 24 ? 'profile' : 'flat', {
      nonNullable: true,
    }),
    otherLoadKw: new FormArray(d.otherLoadKw.map((kw) => loadControl(kw))),
  });
}
type SettingsForm = ReturnType<typeof settingsForm>;

/** The depot's own settings: name, time zone, service limit, other load, billing period start. */
@Component({
  selector: 'ny-depot-settings-panel',
  imports: [
    MatAutocompleteModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatRadioModule,
    PlausibleConfirm,
    ProblemSummary,
    ReactiveFormsModule,
  ],
  templateUrl: './depot-settings-panel.html',
  styleUrls: ['../shared/panel.scss', './depot-settings-panel.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DepotSettingsPanel implements OnInit {
  private readonly api = inject(DepotApi);
  private readonly snackBar = inject(MatSnackBar);
  private readonly drafts = inject(FormDrafts);
  private readonly destroyRef = inject(DestroyRef);

  readonly depot = input.required<DepotDetail>();
  readonly canEdit = input(false);
  readonly saved = output<DepotDetail>();

  protected readonly hours = HOUR_LABELS;
  protected readonly kw = formatKw;
  protected readonly error = errorText;
  protected readonly form = signal<SettingsForm | null>(null);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly problemItems = signal<ProblemItem[]>([]);
  private readonly limitKw = signal<number | null>(null);
  protected readonly limitWarning = computed(() =>
    serviceLimitWarning(
      this.limitKw(),
      Math.max(0, ...this.depot().chargers.map((c) => c.maxKw)),
      Math.max(0, ...this.depot().otherLoadKw),
    ),
  );
  protected readonly limitConfirmed = signal(false);
  protected readonly limitMissing = signal(false);

  protected readonly otherLoad = computed(() => {
    const load = this.depot().otherLoadKw;
    if (load.length !== 24) return { flat: true, text: formatKw(load[0] ?? 0) };
    return { flat: false, text: `Hourly profile, ${formatKw(Math.min(...load))} to ${formatKw(Math.max(...load))}` };
  });

  private readonly allZones = timeZones();
  private readonly zoneQuery = signal('');
  protected readonly zoneOptions = computed(() => {
    const q = this.zoneQuery().trim().toLowerCase().replace(/\s+/g, '_');
    return (q ? this.allZones.filter((z) => z.toLowerCase().includes(q)) : this.allZones).slice(0, 60);
  });

  constructor() {
    trackUnsaved(
      () => this.canEdit() && !!this.form()?.dirty,
      () => "the depot's site settings",
    );
  }

  /** Input left unsaved when the session ended opens the editor again, with that input. */
  ngOnInit(): void {
    if (this.canEdit() && this.drafts.has(DRAFT)) this.edit();
  }

  protected edit(): void {
    const form = settingsForm(this.depot());
    form.controls.timezone.valueChanges
      .pipe(startWith(form.controls.timezone.value))
      .subscribe((v) => this.zoneQuery.set(v));
    form.controls.serviceLimitKw.valueChanges.pipe(startWith(form.controls.serviceLimitKw.value)).subscribe((v) => {
      this.limitKw.set(v);
      this.limitConfirmed.set(false);
      this.limitMissing.set(false);
    });
    this.drafts.register(DRAFT, form, this.destroyRef);
    this.problem.set(null);
    this.problemItems.set([]);
    this.form.set(form);
  }

  protected cancel(): void {
    this.drafts.forget(DRAFT);
    this.form.set(null);
    this.problem.set(null);
    this.problemItems.set([]);
  }

  /** Flat to profile repeats the value for every hour; profile to flat keeps the highest hour. */
  protected setMode(form: SettingsForm, mode: 'flat' | 'profile'): void {
    const values = form.controls.otherLoadKw.getRawValue().filter((v): v is number => typeof v === 'number');
    const arr = form.controls.otherLoadKw;
    arr.clear();
    if (mode === 'flat') arr.push(loadControl(values.length ? Math.max(...values) : 0));
    else for (let h = 0; h < 24; h++) arr.push(loadControl(values[0] ?? 0));
  }

  protected async save(form: SettingsForm): Promise<void> {
    this.problem.set(null);
    this.problemItems.set([]);
    if (form.invalid) {
      form.markAllAsTouched();
      this.problem.set('Check the fields marked in red.');
      return;
    }
    if (this.limitWarning() && !this.limitConfirmed()) {
      this.limitMissing.set(true);
      return;
    }
    const v = form.getRawValue();
    const body: DepotSettings = {
      name: v.name.trim(),
      timezone: v.timezone.trim(),
      serviceLimitKw: v.serviceLimitKw ?? 0,
      billingStartDay: v.billingStartDay ?? 1,
      otherLoadKw: v.otherLoadKw.map((kw) => kw ?? 0),
    };
    this.busy.set(true);
    try {
      const depot = await this.api.saveSettings(this.depot().id, body);
      this.drafts.forget(DRAFT);
      this.form.set(null);
      this.saved.emit(depot);
      this.snackBar.open('Depot settings saved', 'OK');
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyServerErrors(form, p.fields);
      this.problem.set(p.message);
      this.problemItems.set(rest.map((r) => ({ where: r.path, message: r.message })));
    } finally {
      this.busy.set(false);
    }
  }
}
