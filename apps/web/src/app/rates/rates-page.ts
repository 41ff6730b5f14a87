import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import { assignRatePlanSchema, type DepotDetail, type RatePlan } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { DepotApi } from '../depot/depot-api';
import { Clock } from '../core/clock';
import { formatDate } from '../depot/depot-setup-format';
import { DepotListStore } from '../depot-state/depot-list-store';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';
import { SectionIntro } from '../sections/section-intro';
import { applyServerErrors, errorText, zodValidator } from '../shared/form-paths';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { injectCanEditSetup } from '../auth/role-checks';
import { monthRange } from './rate-format';
import { RatesApi } from './rates-api';
import { UrdbDraft } from './urdb-draft';
import { trackUnsaved } from '../core/unsaved-edits';

/** URDB files are one rate record: well under the API's 1 MB body limit. */
const MAX_FILE_BYTES = 1_000_000;

type Assignment = DepotDetail['ratePlans'][number];

/** The Rates section: the depot's rate plan over time, every rate plan, URDB import. */
/**
 * Why a chosen file cannot be a URDB rate record, in words and without echoing its content (a
 * picture or a spreadsheet would otherwise show as garbled characters), or null when it is JSON.
 */
export function urdbFileProblem(name: string, text: string): string | null {
  try {
    JSON.parse(text);
    return null;
  } catch {
    // eslint-disable-next-line no-control-regex -- control characters are what tell a binary file from text
    const binary = /[\u0000-\u0008\u000E-\u001F\u007F-\u009F\uFFFD]/.test(text.slice(0, 2048));
    return binary
      ? `${name} is not a text file (it looks like a picture or another binary file). Choose the JSON file of one rate record exported from the URDB. Nothing was saved.`
      : `${name} is not JSON. Choose the JSON file of one rate record exported from the URDB (not a web page or a spreadsheet). Nothing was saved.`;
  }
}

@Component({
  selector: 'ny-rates-page',
  imports: [
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    ProblemSummary,
    ReactiveFormsModule,
    RouterLink,
    SectionIntro,
  ],
  templateUrl: './rates-page.html',
  styleUrls: ['../shared/panel.scss', './rates-page.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class RatesPage {
  private readonly api = inject(RatesApi);
  private readonly depotApi = inject(DepotApi);
  private readonly depots = inject(DepotListStore);
  private readonly clock = inject(Clock);
  private readonly draft = inject(UrdbDraft);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly canEdit = injectCanEditSetup();
  protected readonly error = errorText;
  protected readonly date = formatDate;

  protected readonly plans = signal<RatePlan[]>([]);
  protected readonly depot = signal<DepotDetail | null>(null);
  protected readonly loading = signal(true);
  protected readonly loadProblem = signal<string | null>(null);

  protected readonly importing = signal(false);
  protected readonly importProblem = signal<string | null>(null);
  protected readonly importItems = signal<ProblemItem[]>([]);

  protected readonly assigning = signal(false);
  protected readonly assignProblem = signal<string | null>(null);
  protected readonly assignForm = new FormGroup({
    ratePlanId: new FormControl<string | null>(
      null,
      zodValidator(assignRatePlanSchema.shape.ratePlanId, 'Choose a rate plan'),
    ),
    effectiveFrom: new FormControl('', {
      nonNullable: true,
      validators: zodValidator(assignRatePlanSchema.shape.effectiveFrom, 'Enter the first day billed under it'),
    }),
  });

  private readonly today = computed(() => this.clock.todayAt(this.depot()?.timezone ?? 'UTC'));
  /** The depot's assignments, newest first, with the one in force today marked. */
  protected readonly assignments = computed(() => {
    const list = this.depot()?.ratePlans ?? [];
    const today = this.today();
    const current = [...list]
      .filter((a) => a.effectiveFrom <= today)
      .sort((a, b) => b.effectiveFrom.localeCompare(a.effectiveFrom))[0];
    return [...list]
      .sort((a, b) => b.effectiveFrom.localeCompare(a.effectiveFrom))
      .map((a) => ({
        assignment: a,
        from: formatDate(a.effectiveFrom),
        state: a === current ? 'In force today' : a.effectiveFrom > today ? 'Coming' : 'Ended',
      }));
  });
  protected readonly planRows = computed(() => {
    const list = this.depot()?.ratePlans ?? [];
    const current = this.assignments().find((a) => a.state === 'In force today')?.assignment;
    return this.plans().map((plan) => {
      const uses = list.filter((a) => a.ratePlanId === plan.id);
      const seasons = plan.definition.seasons
        // "All year", not "All year (All year)".
        .map((s) => {
          const months = monthRange(s.fromMonth, s.toMonth);
          return s.name === months ? s.name : `${s.name} (${months})`;
        })
        .join(', ');
      return {
        plan,
        seasons,
        inForce: current?.ratePlanId === plan.id,
        used: uses.length > 0,
        // Periods by name: a summer and a winter on-peak are one period priced twice.
        periods: new Set(plan.definition.seasons.flatMap((s) => s.periods.map((p) => p.name))).size,
      };
    });
  });

  constructor() {
    trackUnsaved(
      () => this.canEdit() && this.assignForm.dirty,
      () => 'the rate plan to assign',
    );
    void this.load();
  }

  protected async load(): Promise<void> {
    this.loading.set(true);
    this.loadProblem.set(null);
    try {
      await this.depots.load();
      const current = this.depots.current();
      const [plans, depot] = await Promise.all([
        this.api.list(),
        current ? this.depotApi.detail(current.id) : Promise.resolve(null),
      ]);
      this.plans.set(plans);
      this.depot.set(depot);
      if (!this.assignForm.controls.effectiveFrom.value) this.assignForm.controls.effectiveFrom.setValue(this.today());
    } catch (err) {
      this.loadProblem.set(toApiProblem(err).message);
    } finally {
      this.loading.set(false);
    }
  }

  /** Reads the chosen file, has the API map it, and opens the mapped plan for review. */
  protected async onFile(event: Event): Promise<void> {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    this.importProblem.set(null);
    this.importItems.set([]);
    if (file.size > MAX_FILE_BYTES) {
      this.importProblem.set(
        `${file.name} is larger than 1 MB. Export just the one rate record from the URDB and try again. Nothing was saved.`,
      );
      return;
    }
    this.importing.set(true);
    try {
      const text = await file.text();
      const notJson = urdbFileProblem(file.name, text);
      if (notJson) {
        this.importProblem.set(notJson);
        return;
      }
      const result = await this.api.importUrdb(text);
      this.draft.set({ ...result, fileName: file.name });
      await this.router.navigate(['/rates/new'], { queryParams: { from: 'urdb' } });
    } catch (err) {
      const p = toApiProblem(err);
      this.importProblem.set(`${file.name} could not be imported. ${p.message}. Nothing was saved.`.replace('..', '.'));
      this.importItems.set(Object.entries(p.fields).map(([where, message]) => ({ where, message })));
    } finally {
      this.importing.set(false);
    }
  }

  protected async assign(): Promise<void> {
    const depot = this.depot();
    if (!depot) return;
    this.assignProblem.set(null);
    if (this.assignForm.invalid) {
      this.assignForm.markAllAsTouched();
      return;
    }
    const { ratePlanId, effectiveFrom } = this.assignForm.getRawValue();
    this.assigning.set(true);
    try {
      await this.api.assign(depot.id, ratePlanId!, effectiveFrom);
      const name = this.plans().find((p) => p.id === ratePlanId)?.name ?? 'The rate plan';
      this.snackBar.open(`${name} bills the depot from ${formatDate(effectiveFrom)}`, 'OK');
      this.assignForm.controls.ratePlanId.reset(null);
      await this.refreshDepot();
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyServerErrors(this.assignForm, p.fields);
      this.assignProblem.set([p.message, ...rest.map((r) => r.message)].join(' '));
    } finally {
      this.assigning.set(false);
    }
  }

  protected unassign(a: Assignment): void {
    const depot = this.depot();
    if (!depot) return;
    this.confirm(
      {
        title: `Remove the rate plan from ${formatDate(a.effectiveFrom)}?`,
        message: `From ${formatDate(a.effectiveFrom)} the depot is billed under the plan in force before it, if any.`,
        confirm: 'Remove',
      },
      async () => {
        await this.api.unassign(depot.id, a.effectiveFrom);
        this.snackBar.open('Rate plan assignment removed', 'OK');
        await this.refreshDepot();
      },
    );
  }

  protected removePlan(plan: RatePlan): void {
    this.confirm(
      {
        title: `Remove ${plan.name}?`,
        message: 'Only a plan no depot is billed under can be deleted. This cannot be undone.',
        confirm: 'Remove',
      },
      async () => {
        await this.api.remove(plan.id);
        this.plans.update((list) => list.filter((p) => p.id !== plan.id));
        this.snackBar.open(`Rate plan "${plan.name}" deleted`, 'OK');
      },
    );
  }

  private async refreshDepot(): Promise<void> {
    const d = this.depot();
    if (d) this.depot.set(await this.depotApi.detail(d.id));
    void this.depots.load(true);
  }

  private confirm(data: ConfirmData, action: () => Promise<void>): void {
    this.dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '440px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe(async (yes) => {
        if (!yes) return;
        try {
          await action();
        } catch (err) {
          this.snackBar.open(toApiProblem(err).message, 'OK', { duration: 10_000, politeness: 'assertive' });
        }
      });
  }
}
