import { ChangeDetectionStrategy, Component, ElementRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { FormArray, FormGroup, ReactiveFormsModule, type AbstractControl } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import { DAY_TYPES, type RatePlan, type RatePlanDefinition } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { ClockTimeInput } from '../shared/clock-time-input';
import { applyServerErrors, errorText } from '../shared/form-paths';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { injectCanEditSetup } from '../auth/role-checks';
import { DAY_TYPE_LABELS, MONTH_NAMES, windowEndNote } from './rate-format';
import {
  checkDefinition,
  definitionOf,
  describePath,
  energyBlockGroup,
  fixedChargeGroup,
  holidayControl,
  periodGroup,
  ratePlanForm,
  seasonGroup,
  windowGroup,
  type PeriodGroup,
  type RatePlanForm,
  type SeasonGroup,
  type WindowGroup,
} from './rate-plan-form';
import { RatePlanSummary } from './rate-plan-summary';
import { RatesApi } from './rates-api';
import { UrdbDraft } from './urdb-draft';

type Mode = 'new' | 'import' | 'edit';

const FIELD_WORDS: Record<string, string> = {
  name: 'name',
  currency: 'currency',
  fromMonth: 'from month',
  toMonth: 'to month',
  offPeakPrice: 'off-peak price',
  facilityDemandCharge: 'facility demand charge',
  price: 'price',
  demandCharge: 'demand charge',
  dayTypes: 'days',
  from: 'from',
  to: 'to',
  amount: 'amount',
  per: 'per',
  seasons: 'seasons',
  fixedCharges: 'fixed charges',
  holidays: 'holidays',
  energyBlocks: 'energy blocks',
  uptoKwh: 'block end',
  adder: 'price change',
  percent: 'ratchet percentage',
  months: 'ratchet months',
};

/** Every control with an error, deepest first in document order, as `{ path, message }`. */
function collectErrors(control: AbstractControl, path = ''): { path: string; message: string }[] {
  const out: { path: string; message: string }[] = [];
  if (control instanceof FormGroup || control instanceof FormArray) {
    const entries = control instanceof FormArray ? control.controls.map((c, i) => [`[${i}]`, c] as const) : Object.entries(control.controls);
    for (const [key, child] of entries) {
      const childPath = key.startsWith('[') ? `${path}${key}` : path ? `${path}.${key}` : key;
      out.push(...collectErrors(child, childPath));
    }
  }
  if (control.errors) out.push({ path, message: errorText(control) });
  return out;
}

/** "Season 1, period 2, window 1, to" for a field path. */
function where(path: string): string {
  const clean = path.replace(/^definition\./, '');
  const last = /([A-Za-z]+)$/.exec(clean)?.[1] ?? '';
  const words = [describePath(clean), FIELD_WORDS[last] ?? ''].filter(Boolean).join(', ') || clean || 'Plan';
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/** Write a rate plan, or review one mapped from a URDB file, then save it (all or nothing). */
@Component({
  selector: 'ny-rate-plan-editor-page',
  imports: [
    ClockTimeInput,
    MatAutocompleteModule,
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    ProblemSummary,
    RatePlanSummary,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './rate-plan-editor-page.html',
  styleUrls: ['../shared/panel.scss', './rate-plan-editor-page.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class RatePlanEditorPage {
  private readonly api = inject(RatesApi);
  private readonly draft = inject(UrdbDraft);
  private readonly router = inject(Router);
  private readonly snackBar = inject(MatSnackBar);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  /** Route parameter: the plan to change (absent for a new one). */
  readonly id = input<string>();
  /** Query parameter: `urdb` when the form starts from an imported file. */
  readonly from = input<string>();

  protected readonly canEdit = injectCanEditSetup();
  protected readonly months = MONTH_NAMES.map((name, i) => ({ value: i + 1, name }));
  protected readonly dayTypes = DAY_TYPES;
  protected readonly dayLabels = DAY_TYPE_LABELS;
  protected readonly periodNames = ['on-peak', 'mid-peak', 'super off-peak', 'critical peak'];
  protected readonly error = errorText;
  protected readonly endNote = windowEndNote;

  protected readonly mode = signal<Mode>('new');
  protected readonly plan = signal<RatePlan | null>(null);
  protected readonly form = signal<RatePlanForm | null>(null);
  protected readonly notes = signal<string[] | null>(null);
  protected readonly fileName = signal<string | null>(null);
  protected readonly loading = signal(false);
  protected readonly busy = signal(false);
  protected readonly loadProblem = signal<string | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly problemItems = signal<ProblemItem[]>([]);
  protected readonly draftLost = signal(false);

  protected readonly heading = computed(() => {
    if (!this.canEdit()) return this.plan()?.name ?? 'Rate plan';
    switch (this.mode()) {
      case 'import':
        return 'Check the imported rate plan';
      case 'edit':
        return `Change ${this.plan()?.name ?? 'rate plan'}`;
      default:
        return 'New rate plan';
    }
  });
  protected readonly readOnlyDefinition = computed<RatePlanDefinition | null>(() => this.plan()?.definition ?? null);

  constructor() {
    effect(() => {
      const id = this.id();
      const from = this.from();
      untracked(() => void this.start(id, from));
    });
  }

  private async start(id: string | undefined, from: string | undefined): Promise<void> {
    this.problem.set(null);
    this.problemItems.set([]);
    if (id) {
      this.mode.set('edit');
      this.loading.set(true);
      this.loadProblem.set(null);
      try {
        const plan = await this.api.get(id);
        this.plan.set(plan);
        this.form.set(ratePlanForm(plan.name, plan.definition));
      } catch (err) {
        this.loadProblem.set(toApiProblem(err).message);
      } finally {
        this.loading.set(false);
      }
      return;
    }
    const draft = from === 'urdb' ? this.draft.take() : null;
    if (draft) {
      this.mode.set('import');
      this.notes.set(draft.notes);
      this.fileName.set(draft.fileName);
      this.form.set(ratePlanForm(draft.name, draft.definition));
    } else {
      this.mode.set('new');
      this.draftLost.set(from === 'urdb');
      this.form.set(ratePlanForm(''));
    }
  }

  protected addSeason(f: RatePlanForm): void {
    f.controls.seasons.push(seasonGroup());
  }

  protected removeSeason(f: RatePlanForm, i: number): void {
    f.controls.seasons.removeAt(i);
  }

  protected addPeriod(s: SeasonGroup): void {
    s.controls.periods.push(periodGroup());
  }

  protected removePeriod(s: SeasonGroup, i: number): void {
    s.controls.periods.removeAt(i);
  }

  protected addWindow(p: PeriodGroup): void {
    p.controls.windows.push(windowGroup());
  }

  protected removeWindow(p: PeriodGroup, i: number): void {
    p.controls.windows.removeAt(i);
  }

  protected addEnergyBlock(s: SeasonGroup): void {
    // The last block stays open-ended: the one before it gets an end.
    const blocks = s.controls.energyBlocks;
    if (!blocks.length) blocks.push(energyBlockGroup({ uptoKwh: null, adder: 0 }));
    blocks.push(energyBlockGroup({ uptoKwh: null, adder: 0 }));
  }

  protected addFixedCharge(f: RatePlanForm): void {
    f.controls.fixedCharges.push(fixedChargeGroup());
  }

  protected addHoliday(f: RatePlanForm): void {
    f.controls.holidays.push(holidayControl());
  }

  protected windowNote(w: WindowGroup): string | null {
    return this.endNote(w.controls.from.value, w.controls.to.value);
  }

  protected async save(f: RatePlanForm): Promise<void> {
    this.problem.set(null);
    this.problemItems.set([]);
    f.markAllAsTouched();
    if (f.valid) checkDefinition(f);
    if (f.invalid) {
      this.showProblems(f, 'Check the fields marked in red. Nothing was saved.');
      return;
    }
    const body = { name: f.controls.name.value.trim(), definition: definitionOf(f) };
    this.busy.set(true);
    try {
      const current = this.plan();
      const saved = current ? await this.api.update(current.id, body) : await this.api.create(body);
      this.snackBar.open(`Rate plan "${saved.name}" saved`, 'OK');
      await this.router.navigate(['/rates', saved.id]);
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyServerErrors(f, p.fields, 'definition');
      this.showProblems(f, `${p.message}. Nothing was saved.`.replace('..', '.'), rest.map((r) => ({ where: where(r.path), message: r.message })));
    } finally {
      this.busy.set(false);
    }
  }

  private showProblems(f: RatePlanForm, message: string, extra: ProblemItem[] = []): void {
    this.problem.set(message);
    this.problemItems.set([...collectErrors(f).map((e) => ({ where: where(e.path), message: e.message })), ...extra]);
    queueMicrotask(() =>
      this.host.nativeElement
        .querySelector<HTMLElement>('input.ng-invalid, mat-select.ng-invalid, .days.ng-invalid input, .window.ng-invalid input')
        ?.focus(),
    );
  }
}
