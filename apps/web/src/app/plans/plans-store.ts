import { DestroyRef, Injectable, type Signal, computed, inject, linkedSignal, resource, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatSnackBar } from '@angular/material/snack-bar';
import { ActivatedRoute, Router } from '@angular/router';
import type { AdoptedPlan, PlanDetail, PlanResult, PlanSummary, WhatIfAdoption } from '@nightyard/contracts';
import { Subject, mergeMap } from 'rxjs';
import { toApiProblem } from '../core/api-error';
import { addDays, isIsoDate } from '@nightyard/contracts/depot-time';
import { formatServiceDay } from '../depot-state/depot-format';
import { DepotListStore } from '../depot-state/depot-list-store';
import { NightStore } from '../depot-state/night-store';
import { readFileText } from '../core/save-file';
import type { ProblemItem } from '../shared/problem-summary';
import type { TimelineCharger } from './charger-timeline';
import { defaultVersion } from './plan-format';
import { isGenerating, pollPlan } from './plan-poll';
import { PlansApi } from './plans-api';

export type Reviewable = PlanDetail & { result: PlanResult };

/** The query parameters the page was opened with: the night (service date) and the chosen version. */
export interface PlansQuery {
  date: Signal<string | undefined>;
  plan: Signal<string | undefined>;
}

const none: Signal<undefined> = signal(undefined);

/**
 * The Plans page's state: the night's versions, the chosen one in full, the depot's chargers,
 * the progress of versions being generated, and the actions (generate, what-if, publish, adopt).
 * Provided by the page, so it lives and ends with it.
 */
@Injectable()
export class PlansStore {
  private readonly api = inject(PlansApi);
  private readonly depots = inject(DepotListStore);
  private readonly nights = inject(NightStore);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly snackBar = inject(MatSnackBar);
  private readonly destroyRef = inject(DestroyRef);

  private readonly query = signal<PlansQuery>({ date: none, plan: none });
  private readonly date = computed(() => this.query().date());
  private readonly plan = computed(() => this.query().plan());

  readonly depot = this.depots.current;

  /**
   * The night looked at: the one asked for, else tonight as the server says; null while the night
   * of a version opened by id (or tonight) is looked up.
   */
  readonly night = computed(() => {
    const d = this.date();
    if (isIsoDate(d)) return d;
    if (this.plan()) return null;
    const depot = this.depot();
    return depot ? this.nights.tonightOf(depot) : null;
  });

  /** Tonight at the depot, the night shown when none is asked for. */
  readonly tonight = resource({
    params: () => {
      const depot = this.depot();
      return depot && !isIsoDate(this.date()) && !this.plan() ? depot : undefined;
    },
    loader: ({ params }) => this.nights.load(params),
  });

  /** A version opened by id alone (the link in the e-mail): its night is looked up, then shown. */
  private openedDetail: PlanDetail | null = null;
  readonly opened = resource({
    params: () => {
      const p = this.plan();
      return p && !isIsoDate(this.date()) ? p : undefined;
    },
    loader: async ({ params: id }) => {
      try {
        const d = await this.api.plan(id);
        this.openedDetail = d;
        // A link to a version of another of the person's depots opens that depot (the store follows it).
        if (d.depotId !== this.depot()?.id) await this.depots.choose(d.depotId, { restart: false });
        this.navigate({ date: d.serviceDate, plan: d.id }, true);
        return d;
      } catch (err) {
        this.problem.set(`That plan could not be opened. ${toApiProblem(err).message}`);
        this.navigate({ date: null, plan: null }, true);
        return null;
      }
    },
  });

  private readonly nightKey = computed(
    () => {
      const depotId = this.depot()?.id;
      const night = this.night();
      return depotId && night ? { depotId, night } : undefined;
    },
    { equal: (a, b) => a?.depotId === b?.depotId && a?.night === b?.night },
  );

  /** The night's versions; versions being generated are followed until done. */
  private readonly list = resource({
    params: () => this.nightKey(),
    defaultValue: [],
    loader: async ({ params }) => {
      const list = await this.api.list(params.depotId, params.night);
      for (const v of list) if (isGenerating(v)) this.watch(v.id);
      return list;
    },
  });
  readonly versions = computed(() => (this.list.hasValue() ? this.list.value() : []));

  /** Where the night looked at stands among the service days (null until known or if it fails). */
  private readonly dateNight = resource({
    params: () => this.nightKey(),
    loader: ({ params }) => this.api.dateNight(params.depotId, params.night),
  });
  private readonly place = computed(() => (this.dateNight.hasValue() ? (this.dateNight.value() ?? null) : null));
  /** A day without runs inside another service day's night (a weekend's Saturday): that day. */
  readonly within = computed(() => this.place()?.within ?? null);

  /** The service day before or after the night looked at (a day either way where none is known). */
  stepNight(days: -1 | 1): void {
    const n = this.night();
    if (!n) return;
    const place = this.place();
    const to = place?.date === n ? (days < 0 ? place.previous : place.next) : null;
    this.goToNight(to ?? addDays(n, days));
  }
  readonly versionsLoading = this.list.isLoading;

  readonly selectedId = computed(() => {
    const list = this.versions();
    const p = this.plan();
    if (p && list.some((v) => v.id === p)) return p;
    return defaultVersion(list)?.id ?? null;
  });
  readonly selected = computed(() => this.versions().find((v) => v.id === this.selectedId()) ?? null);
  readonly published = computed(() => this.versions().find((v) => v.state === 'published') ?? null);

  /** The chosen version in full (the one just opened by id is not asked for twice). */
  private readonly chosen = resource({
    params: () => this.selectedId() ?? undefined,
    loader: async ({ params: id }) => {
      const known = this.openedDetail;
      const d = known?.id === id && known.result ? known : await this.api.plan(id);
      if (isGenerating(d)) this.watch(d.id);
      return d;
    },
  });
  /** The version in full last loaded (kept while the next one loads, for its zone and currency). */
  readonly detail = linkedSignal<PlanDetail | null, PlanDetail | null>({
    source: () => (this.chosen.hasValue() ? (this.chosen.value() ?? null) : null),
    computation: (d, previous) => d ?? (this.selectedId() ? (previous?.value ?? null) : null),
  });
  readonly reviewed = computed<Reviewable | null>(() => {
    const d = this.detail();
    return d && d.id === this.selectedId() && d.status === 'done' && d.result ? (d as Reviewable) : null;
  });

  /**
   * The depot's chargers, so idle ones in service show on the timeline too, and one out of service
   * now that the plan used before still shows its power.
   */
  private readonly depotChargers = resource({
    params: () => (this.nightKey() ? this.nightKey()!.depotId : undefined),
    defaultValue: [],
    loader: async ({ params: depotId }): Promise<TimelineCharger[]> => {
      try {
        const depot = await this.api.depot(depotId);
        return depot.chargers.map((c) => ({ id: c.label, maxKw: c.maxKw, out: c.status !== 'in_service' }));
      } catch {
        // The timeline then shows the chargers the plan uses.
        return [];
      }
    },
  });
  readonly chargers = computed(() => (this.depotChargers.hasValue() ? this.depotChargers.value() : []));

  /** Plan times are the depot's. */
  readonly tz = computed(() => this.detail()?.timezone ?? this.depot()?.timezone ?? 'UTC');
  /** Plan summaries carry no currency: the one of the plan in view (USD until one is loaded). */
  readonly currency = computed(() => this.detail()?.currency ?? 'USD');

  /** Follows the night's published version (else its newest), so a night-only night stays night-only. */
  readonly includeMidday = linkedSignal(
    () => defaultVersion(this.versions().filter((v) => v.kind !== 'what-if'))?.includesMidday ?? true,
  );
  readonly busy = signal<string | null>(null);
  /** What went wrong last: a failed load, until an action clears it or says what went wrong with it. */
  readonly problem = linkedSignal<string | null>(() => messageOf(this.list.error()) ?? messageOf(this.chosen.error()));
  readonly problems = signal<ProblemItem[]>([]);
  /** Publishing refused because someone else published meanwhile; cleared when another night is shown. */
  readonly conflict = linkedSignal<unknown, string | null>({ source: this.nightKey, computation: () => null });
  readonly comparePreferred = linkedSignal<unknown, string | null>({ source: this.nightKey, computation: () => null });
  /** The what-if just adopted and what differed, shown above the new draft it made. */
  readonly adopted = signal<AdoptedPlan | null>(null);
  readonly announcement = signal('');

  /** Versions whose progress is being followed. */
  private readonly watching = new Set<string>();
  private readonly watch$ = new Subject<string>();

  constructor() {
    void this.depots.load();
    this.watch$
      .pipe(
        mergeMap((id) => pollPlan(() => this.api.plan(id))),
        takeUntilDestroyed(this.destroyRef),
      )
      .subscribe((d) => this.progressed(d));
  }

  /** Binds the page's query parameters. */
  bind(query: PlansQuery): void {
    this.query.set(query);
  }

  /** Follows a version's progress until the engine is done with it. */
  watch(id: string): void {
    if (this.watching.has(id)) return;
    this.watching.add(id);
    this.watch$.next(id);
  }

  private progressed(d: PlanDetail): void {
    this.list.update((list) => list.map((v) => (v.id === d.id ? toSummary(d) : v)));
    if (this.selectedId() === d.id) this.chosen.set(d);
    if (isGenerating(d)) return;
    this.watching.delete(d.id);
    this.announcement.set(
      d.status === 'done'
        ? `Version ${d.version} is ready to review.`
        : `Version ${d.version} could not be generated. ${d.error ?? ''}`,
    );
  }

  /** A version made here goes to the top of the list (when it is this night's) and is followed. */
  private added(plan: PlanSummary): void {
    if (plan.serviceDate === this.night()) this.list.update((list) => [plan, ...list.filter((v) => v.id !== plan.id)]);
    this.navigate({ date: plan.serviceDate, plan: plan.id });
    this.watch(plan.id);
  }

  private navigate(params: { date?: string | null; plan?: string | null }, replaceUrl = false): void {
    void this.router.navigate([], {
      relativeTo: this.route,
      queryParams: params,
      queryParamsHandling: 'merge',
      replaceUrl,
    });
  }

  clearProblems(): void {
    this.problem.set(null);
    this.problems.set([]);
  }

  goToNight(date: string): void {
    if (!isIsoDate(date) || date === this.night()) return;
    this.clearProblems();
    this.navigate({ date, plan: null });
  }

  async generate(): Promise<void> {
    const depotId = this.depot()?.id;
    const night = this.night();
    if (!depotId || !night || this.busy()) return;
    this.clearProblems();
    this.conflict.set(null);
    this.busy.set('Starting the plan');
    try {
      const plan = await this.api.generate(depotId, night, this.includeMidday());
      this.announcement.set(`Version ${plan.version} is being generated.`);
      this.added(plan);
    } catch (err) {
      const p = toApiProblem(err);
      this.problem.set(p.message);
      this.problems.set(
        Object.entries(p.fields).map(([path, message]) => ({
          where: path === 'serviceDate' ? 'Night' : path,
          message,
        })),
      );
    } finally {
      this.busy.set(null);
    }
  }

  async uploadWhatIf(file: File): Promise<void> {
    const depotId = this.depot()?.id;
    if (!depotId || this.busy()) return;
    this.clearProblems();
    this.busy.set(`Uploading ${file.name}`);
    try {
      let scenario: unknown;
      try {
        scenario = JSON.parse(await readFileText(file));
      } catch (e) {
        this.problem.set(
          `${file.name} is not a scenario file: it is not valid JSON (${(e as Error).message}). Nothing was saved.`,
        );
        return;
      }
      const plan = await this.api.whatIf(depotId, scenario);
      this.announcement.set(
        `What-if version ${plan.version} for the night of ${formatServiceDay(plan.serviceDate)} is being generated.`,
      );
      this.added(plan);
    } catch (err) {
      const p = toApiProblem(err);
      this.problem.set(`${file.name}: ${p.message}`);
      this.problems.set(Object.entries(p.fields).map(([where, message]) => ({ where, message })));
    } finally {
      this.busy.set(null);
    }
  }

  /** A file of the plan (scenario or OCPP profiles) fetched with the bearer token; null when refused. */
  async download(fetch: () => Promise<Blob>): Promise<Blob | null> {
    this.clearProblems();
    try {
      return await fetch();
    } catch (err) {
      this.problem.set(toApiProblem(err).message);
      return null;
    }
  }

  scenario(plan: PlanSummary): Promise<Blob | null> {
    return this.download(() => this.api.scenario(plan.id));
  }

  ocppProfiles(plan: PlanSummary, version: '1.6' | '2.0.1'): Promise<Blob | null> {
    return this.download(() => this.api.ocppProfiles(plan.id, version));
  }

  /** Publishes a version (confirmed by the page first); a plan published meanwhile is shown as a conflict. */
  async publish(plan: PlanSummary): Promise<void> {
    if (this.busy()) return;
    this.clearProblems();
    this.conflict.set(null);
    this.busy.set(`Publishing version ${plan.version}`);
    try {
      const done = await this.api.publish(plan.id, this.published()?.id ?? null);
      this.snackBar.open(`Version ${done.version} published; the yard and supervisors are being e-mailed`, 'OK');
      this.announcement.set(`Version ${done.version} is published.`);
      await this.reload();
    } catch (err) {
      const p = toApiProblem(err);
      // Only a plan published meanwhile is offered a reload and compare; any other refusal
      // (not finished, already published, a what-if, a night that moved) says why in words.
      if (p.code === 'published_meanwhile') this.conflict.set(p.message);
      else this.problem.set(`Not published. ${p.message}`);
    } finally {
      this.busy.set(null);
    }
  }

  /** What adopting a what-if would change (its study re-checked against the depot now); null when refused. */
  async adoption(plan: PlanSummary): Promise<WhatIfAdoption | null> {
    if (this.busy()) return null;
    this.clearProblems();
    this.conflict.set(null);
    this.busy.set(`Re-checking what-if version ${plan.version} against the depot`);
    try {
      return await this.api.adoption(plan.id);
    } catch (err) {
      this.problem.set(`Not adopted. ${toApiProblem(err).message}`);
      return null;
    } finally {
      this.busy.set(null);
    }
  }

  /** Adopts a what-if: a new normal draft, opened and followed. */
  async adopt(plan: PlanSummary): Promise<void> {
    this.busy.set(`Adopting what-if version ${plan.version}`);
    try {
      const done = await this.api.adopt(plan.id);
      this.adopted.set(done);
      this.announcement.set(
        `Version ${done.plan.version}, adopted from what-if version ${plan.version}, is being generated.`,
      );
      this.snackBar.open(`What-if version ${plan.version} adopted as draft version ${done.plan.version}`, 'OK');
      this.added(done.plan);
    } catch (err) {
      this.problem.set(`Not adopted. ${toApiProblem(err).message}`);
    } finally {
      this.busy.set(null);
    }
  }

  /** The night's versions and the chosen one again, as the API has them now. */
  async reload(): Promise<void> {
    const key = this.nightKey();
    if (!key) return;
    try {
      this.list.set(await this.api.list(key.depotId, key.night));
      const id = this.selectedId();
      if (id) this.chosen.set(await this.api.plan(id));
    } catch (err) {
      this.problem.set(toApiProblem(err).message);
    }
  }

  async reloadAfterConflict(compare: boolean): Promise<void> {
    this.conflict.set(null);
    await this.reload();
    const published = this.published();
    if (compare && published) this.comparePreferred.set(published.id);
  }
}

/** The summary part of a plan in full (the list keeps summaries). */
function toSummary(d: PlanDetail): PlanSummary {
  const {
    timezone: _t,
    currency: _c,
    notes: _n,
    result: _r,
    busCapacityKwh: _b,
    plannedFrom: _f,
    runsChanged: _rc,
    ...summary
  } = d;
  return summary;
}

function messageOf(err: unknown): string | null {
  return err ? toApiProblem(err).message : null;
}
