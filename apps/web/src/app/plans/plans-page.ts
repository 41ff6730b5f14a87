import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, linkedSignal, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import type { AdoptedPlan, PlanDetail, PlanResult, PlanSummary } from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';
import { toApiProblem } from '../core/api-error';
import { formatServiceDay } from '../depot-state/depot-format';
import { DepotListStore } from '../depot-state/depot-list-store';
import { NightStore } from '../depot-state/night-store';
import { injectSaveFile, readFileText } from '../core/save-file';
import { injectCanEditFleet } from '../auth/role-checks';
import { addDays, isIsoDate } from '@nightyard/contracts/depot-time';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';
import { SectionIntro } from '../sections/section-intro';
import type { TimelineCharger } from './charger-timeline';
import { AdoptDialog, type AdoptData } from './adopt-dialog';
import { KIND_LABELS, defaultVersion, money, versionLabel, when } from './plan-format';
import { PlanReview } from './plan-review';
import { PlansApi } from './plans-api';

/** How often a plan being generated is asked for its progress. */
export const POLL_MS = 700;

type Reviewable = PlanDetail & { result: PlanResult };

/** Plans: the versions of a night's plan, the chosen version's review, generate and publish. */
@Component({
  selector: 'ny-plans-page',
  imports: [
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    PlanReview,
    ProblemSummary,
    RouterLink,
    SectionIntro,
  ],
  templateUrl: './plans-page.html',
  styleUrl: './plans-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class PlansPage {
  private readonly api = inject(PlansApi);
  private readonly depots = inject(DepotListStore);
  private readonly nights = inject(NightStore);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly saveFile = injectSaveFile();

  /** Query parameters: the night (service date) and the chosen version. */
  readonly date = input<string>();
  readonly plan = input<string>();

  protected readonly canPlan = injectCanEditFleet();
  protected readonly depot = this.depots.current;
  protected readonly kindLabels = KIND_LABELS;
  protected readonly versionLabel = versionLabel;
  protected readonly when = when;
  protected readonly money = money;

  /**
   * The night looked at: the one asked for, else tonight as the server says; null while the night
   * of a version opened by id (or tonight) is looked up.
   */
  protected readonly night = computed(() => {
    const d = this.date();
    if (isIsoDate(d)) return d;
    if (this.plan()) return null;
    const depot = this.depot();
    return depot ? this.nights.tonightOf(depot) : null;
  });
  /** Plan times are the depot's. */
  protected readonly tz = computed(() => this.detail()?.timezone ?? this.depot()?.timezone ?? 'UTC');
  protected readonly nightText = computed(() => {
    const n = this.night();
    return n ? formatServiceDay(n) : '';
  });

  protected readonly versions = signal<PlanSummary[]>([]);
  private readonly versionsNight = signal<string | null>(null);
  protected readonly versionsLoading = signal(false);
  protected readonly selectedId = computed(() => {
    const list = this.versions();
    const p = this.plan();
    if (p && list.some((v) => v.id === p)) return p;
    return defaultVersion(list)?.id ?? null;
  });
  protected readonly selected = computed(() => this.versions().find((v) => v.id === this.selectedId()) ?? null);
  protected readonly published = computed(() => this.versions().find((v) => v.state === 'published') ?? null);
  protected readonly detail = signal<PlanDetail | null>(null);
  protected readonly reviewed = computed<Reviewable | null>(() => {
    const d = this.detail();
    return d && d.id === this.selectedId() && d.status === 'done' && d.result ? (d as Reviewable) : null;
  });
  protected readonly chargers = signal<TimelineCharger[]>([]);
  /** Plan summaries carry no currency: the one of the plan in view (USD until one is loaded). */
  protected readonly currency = computed(() => this.detail()?.currency ?? 'USD');

  /** Follows the night's published version (else its newest), so a night-only night stays night-only. */
  protected readonly includeMidday = linkedSignal(
    () => defaultVersion(this.versions().filter((v) => v.kind !== 'what-if'))?.includesMidday ?? true,
  );
  protected readonly busy = signal<string | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly problems = signal<ProblemItem[]>([]);
  protected readonly conflict = signal<string | null>(null);
  protected readonly comparePreferred = signal<string | null>(null);
  /** The what-if just adopted and what differed, shown above the new draft it made. */
  protected readonly adopted = signal<AdoptedPlan | null>(null);
  protected readonly announcement = signal('');

  private readonly watching = new Set<string>();
  private destroyed = false;
  private versionsSeq = 0;
  private detailSeq = 0;
  private chargersOf: string | null = null;

  constructor() {
    void this.depots.load();
    inject(DestroyRef).onDestroy(() => (this.destroyed = true));

    // A version opened by id alone (the link in the e-mail): find its night, then show it there.
    effect(() => {
      const p = this.plan();
      if (p && !isIsoDate(this.date())) untracked(() => void this.openById(p));
    });
    // Tonight at the depot, the night shown when none is asked for.
    effect(() => {
      const depot = this.depot();
      if (depot && !isIsoDate(this.date()) && !this.plan()) untracked(() => void this.nights.load(depot));
    });
    // The night's versions.
    effect(() => {
      const depot = this.depot();
      const night = this.night();
      if (!depot || !night) return;
      untracked(() => {
        if (this.versionsNight() !== night) void this.loadVersions(depot.id, night);
        if (this.chargersOf !== depot.id) void this.loadChargers(depot.id);
      });
    });
    // The chosen version in full.
    effect(() => {
      const id = this.selectedId();
      untracked(() => {
        if (!id) this.detail.set(null);
        else if (this.detail()?.id !== id || !this.detail()?.result) void this.loadDetail(id);
      });
    });
  }

  private async openById(id: string): Promise<void> {
    try {
      const d = await this.api.plan(id);
      this.detail.set(d);
      this.navigate({ date: d.serviceDate, plan: d.id }, true);
    } catch (err) {
      this.problem.set(`That plan could not be opened. ${toApiProblem(err).message}`);
      this.navigate({ date: null, plan: null }, true);
    }
  }

  private async loadVersions(depotId: string, night: string, keep = false): Promise<void> {
    const seq = ++this.versionsSeq;
    if (!keep) {
      this.versions.set([]);
      this.conflict.set(null);
      this.comparePreferred.set(null);
    }
    this.versionsLoading.set(true);
    try {
      const list = await this.api.list(depotId, night);
      if (seq !== this.versionsSeq) return;
      this.versions.set(list);
      this.versionsNight.set(night);
      for (const v of list) if (v.status === 'queued' || v.status === 'running') this.watch(v.id);
    } catch (err) {
      if (seq === this.versionsSeq) this.problem.set(toApiProblem(err).message);
    } finally {
      if (seq === this.versionsSeq) this.versionsLoading.set(false);
    }
  }

  private async loadDetail(id: string): Promise<void> {
    const seq = ++this.detailSeq;
    try {
      const d = await this.api.plan(id);
      if (seq !== this.detailSeq || this.selectedId() !== id) return;
      this.detail.set(d);
      if (d.status === 'queued' || d.status === 'running') this.watch(d.id);
    } catch (err) {
      if (seq === this.detailSeq) this.problem.set(toApiProblem(err).message);
    }
  }

  private async loadChargers(depotId: string): Promise<void> {
    this.chargersOf = depotId;
    try {
      const depot = await this.api.depot(depotId);
      this.chargers.set(depot.chargers.filter((c) => c.status === 'in_service').map((c) => ({ id: c.label, maxKw: c.maxKw })));
    } catch {
      // The timeline then shows the chargers the plan uses.
      this.chargers.set([]);
    }
  }

  /** Asks for a plan's progress every POLL_MS until the engine is done with it. */
  private watch(id: string): void {
    if (this.watching.has(id)) return;
    this.watching.add(id);
    const tick = async () => {
      if (this.destroyed) return;
      let next = POLL_MS;
      try {
        const d = await this.api.plan(id);
        if (this.destroyed) return;
        this.versions.update((list) => list.map((v) => (v.id === id ? toSummary(d) : v)));
        if (this.selectedId() === id) this.detail.set(d);
        if (d.status === 'done' || d.status === 'failed') {
          this.watching.delete(id);
          this.announcement.set(
            d.status === 'done' ? `Version ${d.version} is ready to review.` : `Version ${d.version} could not be generated. ${d.error ?? ''}`,
          );
          return;
        }
      } catch {
        next = POLL_MS * 3;
      }
      setTimeout(() => void tick(), next);
    };
    setTimeout(() => void tick(), POLL_MS);
  }

  private navigate(params: { date?: string | null; plan?: string | null }, replaceUrl = false): void {
    void this.router.navigate([], { relativeTo: this.route, queryParams: params, queryParamsHandling: 'merge', replaceUrl });
  }

  private clearProblems(): void {
    this.problem.set(null);
    this.problems.set([]);
  }

  protected goToNight(date: string): void {
    if (!isIsoDate(date) || date === this.night()) return;
    this.clearProblems();
    this.navigate({ date, plan: null });
  }

  protected step(days: number): void {
    const n = this.night();
    if (n) this.goToNight(addDays(n, days));
  }

  protected async generate(): Promise<void> {
    const depotId = this.depot()?.id;
    const night = this.night();
    if (!depotId || !night || this.busy()) return;
    this.clearProblems();
    this.conflict.set(null);
    this.busy.set('Starting the plan');
    try {
      const plan = await this.api.generate(depotId, night, this.includeMidday());
      this.versions.update((list) => [plan, ...list.filter((v) => v.id !== plan.id)]);
      this.announcement.set(`Version ${plan.version} is being generated.`);
      this.navigate({ date: night, plan: plan.id });
      this.watch(plan.id);
    } catch (err) {
      const p = toApiProblem(err);
      this.problem.set(p.message);
      this.problems.set(Object.entries(p.fields).map(([path, message]) => ({ where: path === 'serviceDate' ? 'Night' : path, message })));
    } finally {
      this.busy.set(null);
    }
  }

  protected async uploadWhatIf(fileInput: HTMLInputElement): Promise<void> {
    const file = fileInput.files?.[0];
    const depotId = this.depot()?.id;
    fileInput.value = '';
    if (!file || !depotId || this.busy()) return;
    this.clearProblems();
    this.busy.set(`Uploading ${file.name}`);
    try {
      let scenario: unknown;
      try {
        scenario = JSON.parse(await readFileText(file));
      } catch (e) {
        this.problem.set(`${file.name} is not a scenario file: it is not valid JSON (${(e as Error).message}). Nothing was saved.`);
        return;
      }
      const plan = await this.api.whatIf(depotId, scenario);
      this.announcement.set(`What-if version ${plan.version} for the night of ${formatServiceDay(plan.serviceDate)} is being generated.`);
      if (plan.serviceDate === this.night()) this.versions.update((list) => [plan, ...list.filter((v) => v.id !== plan.id)]);
      this.navigate({ date: plan.serviceDate, plan: plan.id });
      this.watch(plan.id);
    } catch (err) {
      const p = toApiProblem(err);
      this.problem.set(`${file.name}: ${p.message}`);
      this.problems.set(Object.entries(p.fields).map(([where, message]) => ({ where, message })));
    } finally {
      this.busy.set(null);
    }
  }

  protected async downloadScenario(plan: PlanSummary): Promise<void> {
    this.clearProblems();
    try {
      const blob = await this.api.scenario(plan.id);
      this.saveFile(blob, `scenario-${plan.serviceDate}-v${plan.version}.json`);
    } catch (err) {
      this.problem.set(toApiProblem(err).message);
    }
  }

  /** Charging profiles for a charging-station management system to enforce the plan. */
  protected async downloadOcpp(plan: PlanSummary, version: '1.6' | '2.0.1'): Promise<void> {
    this.clearProblems();
    try {
      const blob = await this.api.ocppProfiles(plan.id, version);
      this.saveFile(blob, `ocpp-${version}-profiles-${plan.serviceDate}-v${plan.version}.json`);
    } catch (err) {
      this.problem.set(toApiProblem(err).message);
    }
  }

  protected async publish(plan: PlanSummary): Promise<void> {
    if (this.busy()) return;
    const current = this.published();
    const depotName = this.depot()?.name ?? 'the depot';
    const data: ConfirmData = {
      title: `Publish version ${plan.version}?`,
      message:
        `A published plan cannot be changed: any later change makes a new version. ` +
        (current ? `It replaces version ${current.version}, which becomes superseded. ` : '') +
        `The yard staff and fleet supervisors of ${depotName} are e-mailed the plan for the night of ${formatServiceDay(plan.serviceDate)}.`,
      confirm: 'Publish plan',
    };
    const yes = await firstValueFrom(
      this.dialog.open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '480px', maxWidth: '95vw' }).afterClosed(),
    );
    if (!yes) return;
    this.clearProblems();
    this.conflict.set(null);
    this.busy.set(`Publishing version ${plan.version}`);
    try {
      const done = await this.api.publish(plan.id, current?.id ?? null);
      this.snackBar.open(`Version ${done.version} published; the yard and supervisors are being e-mailed`, 'OK');
      this.announcement.set(`Version ${done.version} is published.`);
      await this.reload();
    } catch (err) {
      const p = toApiProblem(err);
      if (p.status === 409) this.conflict.set(p.message);
      else this.problem.set(p.message);
    } finally {
      this.busy.set(null);
    }
  }

  protected adoptedSentence(a: AdoptedPlan): string {
    const n = a.adoption.differences.length;
    return `Adopted from what-if version ${a.adoption.whatIf.version}, re-checked against the depot as it is now: ` +
      (n === 0 ? 'nothing differed from the study.' : `${n === 1 ? '1 difference' : `${n} differences`} from the study, the depot's data used.`);
  }

  /**
   * Adopts a what-if: re-checks the study against the depot now, lists what differs in a dialog,
   * then makes a new normal draft and opens it. A refusal (night ended, cannot be re-checked) is
   * shown as the API words it.
   */
  protected async adopt(plan: PlanSummary): Promise<void> {
    if (this.busy()) return;
    this.clearProblems();
    this.conflict.set(null);
    this.busy.set(`Re-checking what-if version ${plan.version} against the depot`);
    try {
      const adoption = await this.api.adoption(plan.id);
      const data: AdoptData = { adoption, night: formatServiceDay(plan.serviceDate), depot: this.depot()?.name ?? 'the depot' };
      this.busy.set(null);
      const yes = await firstValueFrom(
        this.dialog.open<AdoptDialog, AdoptData, boolean>(AdoptDialog, { data, width: '560px', maxWidth: '95vw' }).afterClosed(),
      );
      if (!yes) return;
      this.busy.set(`Adopting what-if version ${plan.version}`);
      const done = await this.api.adopt(plan.id);
      this.adopted.set(done);
      this.versions.update((list) => [done.plan, ...list.filter((v) => v.id !== done.plan.id)]);
      this.announcement.set(`Version ${done.plan.version}, adopted from what-if version ${plan.version}, is being generated.`);
      this.snackBar.open(`What-if version ${plan.version} adopted as draft version ${done.plan.version}`, 'OK');
      this.navigate({ date: done.plan.serviceDate, plan: done.plan.id });
      this.watch(done.plan.id);
    } catch (err) {
      this.problem.set(`Not adopted. ${toApiProblem(err).message}`);
    } finally {
      this.busy.set(null);
    }
  }

  /** The night's versions and the chosen one again, as the API has them now. */
  protected async reload(): Promise<void> {
    const depotId = this.depot()?.id;
    const night = this.night();
    if (!depotId || !night) return;
    await this.loadVersions(depotId, night, true);
    const id = this.selectedId();
    if (id) await this.loadDetail(id);
  }

  protected async reloadAfterConflict(compare: boolean): Promise<void> {
    this.conflict.set(null);
    await this.reload();
    const published = this.published();
    if (compare && published) this.comparePreferred.set(published.id);
  }
}

/** The summary part of a plan in full (the list keeps summaries). */
function toSummary(d: PlanDetail): PlanSummary {
  const { timezone: _t, currency: _c, notes: _n, result: _r, busCapacityKwh: _b, plannedFrom: _f, ...summary } = d;
  return summary;
}
