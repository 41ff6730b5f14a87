import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  Injector,
  computed,
  effect,
  inject,
  signal,
  untracked,
  type EffectRef,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { PLANNERS, PLAN_READERS, hasAnyRole, type DepotDetail, type PlanDetail } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { toApiProblem } from '../core/api-error';
import { Clock } from '../core/clock';
import { ChargerFaults, faultsOf } from '../depot-state/charger-faults';
import { outAt } from '../depot-state/charger-out';
import { CurrentDepot } from '../depot-state/current-depot';
import { formatServiceDay } from '../depot-state/depot-format';
import { DepotListStore } from '../depot-state/depot-list-store';
import { LiveStore, reloadOnLive, type LiveDepot } from '../depot-state/live-store';
import { NightStore, type NightDepot } from '../depot-state/night-store';
import {
  money,
  naturalCompare,
  nightComparison,
  num,
  runsChangedNote,
  serviceLimitLowered,
  when,
} from '../plans/plan-format';
import { PlansApi } from '../plans/plans-api';
import { SectionIntro } from '../sections/section-intro';
import {
  NIGHTS_BACK,
  candidateNights,
  liveCounts,
  liveStateOf,
  LIVE_STATES,
  peakLoad,
  shortBuses,
} from './tonight-format';

type LoadState = 'idle' | 'loading' | 'loaded' | 'failed';

/** Who may generate and publish plans (the API's planners). */

/**
 * The night ahead at a glance: the depot's summary, tonight's published plan (buses, plug-ins,
 * energy cost against the cheaper baseline, peak load, short buses) and the chargers' live states.
 */
@Component({
  selector: 'ny-tonight-page',
  imports: [
    ChargerFaults,
    CurrentDepot,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    RouterLink,
    SectionIntro,
  ],
  templateUrl: './tonight-page.html',
  styleUrl: './tonight-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class TonightPage {
  private readonly depots = inject(DepotListStore);
  private readonly api = inject(PlansApi);
  private readonly auth = inject(AuthStore);
  private readonly nights = inject(NightStore);
  private readonly liveStore = inject(LiveStore);
  private readonly destroyRef = inject(DestroyRef);
  private readonly injector = inject(Injector);
  private readonly clock = inject(Clock);
  /** The depot's live stream: charger states as they change, publications and revisions. */
  protected readonly live = signal<LiveDepot | null>(null);
  private liveReload: EffectRef | null = null;

  /** The published plan of tonight (null: none in the nights looked at). */
  protected readonly plan = signal<PlanDetail | null>(null);
  protected readonly planState = signal<LoadState>('idle');
  protected readonly planError = signal<string | null>(null);
  protected readonly detail = signal<DepotDetail | null>(null);
  protected readonly detailState = signal<LoadState>('idle');
  protected readonly detailError = signal<string | null>(null);
  protected readonly nightsBack = NIGHTS_BACK;
  /** The night the page looked from (the server's "tonight"). */
  protected readonly tonight = signal<string | null>(null);

  protected readonly canOpenPlans = computed(() => hasAnyRole(this.auth.roles(), PLAN_READERS));
  protected readonly canGenerate = computed(() => hasAnyRole(this.auth.roles(), PLANNERS));
  protected readonly hasDepot = computed(() => this.depots.current() !== null);

  protected readonly night = computed(() => {
    const p = this.plan();
    if (!p) return null;
    const r = p.result;
    const short = shortBuses(p);
    const peak = peakLoad(p);
    const versus = r ? nightComparison(r) : null;
    return {
      id: p.id,
      date: p.serviceDate,
      day: formatServiceDay(p.serviceDate),
      /** Set when the plan shown is of an earlier night: none is published for tonight yet. */
      tonightDay: this.tonight() && this.tonight() !== p.serviceDate ? formatServiceDay(this.tonight()!) : null,
      version: p.version,
      published: p.publishedAt
        ? `${when(p.publishedAt, p.timezone)}${p.publishedBy ? ` by ${p.publishedBy}` : ''}`
        : null,
      hasResult: r !== null,
      buses: r?.buses.length ?? 0,
      plugIns: r?.sessions.length ?? 0,
      busesPluggedIn: r ? new Set(r.sessions.map((s) => s.bus)).size : 0,
      cost: r ? money(r.cost.total, p.currency) : null,
      energy: versus ? money(versus.planEnergy, p.currency) : null,
      baselineName: versus?.baselineName ?? null,
      baseline: versus ? money(versus.baselineEnergy, p.currency) : null,
      other: versus?.otherName ? `${versus.otherName}: ${money(versus.otherEnergy!, p.currency)}` : null,
      baselineShort: versus && versus.baselineShortKwh > 0.05 ? `${num(versus.baselineShortKwh)} kWh` : null,
      saving: versus ? money(Math.abs(versus.energySaving), p.currency) : null,
      saves: versus !== null && versus.energySaving >= 0,
      // A saving under 1 % keeps its tenth (0.4 % read "0 % less"); none at all has no share.
      savingPct:
        versus && versus.baselineEnergy > 0 && versus.energySaving > 0
          ? num(versus.energySavingShare * 100, versus.energySavingShare < 0.01 ? 1 : 0)
          : null,
      // What the plan does for the month's demand charge, where the energy alone says little.
      peakCut:
        r && peak && peak.peakKw < r.baseline.peakKw - 0.05
          ? `and keeps the peak at ${num(peak.peakKw)} kW where the baseline would reach ${num(r.baseline.peakKw)} kW: demand is billed on the month's peak`
          : null,
      peak: peak
        ? {
            ...peak,
            peakText: `${num(peak.peakKw)} kW`,
            limitText: `${num(peak.limitKw)} kW`,
            share: peak.limitKw > 0 ? Math.min(100, (peak.peakKw / peak.limitKw) * 100) : 0,
            sharePct: peak.limitKw > 0 ? num((peak.peakKw / peak.limitKw) * 100, 0) : null,
            // The depot's service limit lowered since the plan was made, below what it draws: the
            // plan does not know, and only a new plan keeps to it.
            lowered: (() => {
              const lowered = serviceLimitLowered(peak.peakKw, peak.limitKw, this.depots.current()?.serviceLimitKw);
              return lowered && `${lowered} Generate the night again under Plans so it keeps to the new limit.`;
            })(),
          }
        : null,
      baselinePeak: r ? `${num(r.baseline.peakKw)} kW` : null,
      short,
      runsChanged: (() => {
        const note = runsChangedNote(p.runsChanged ?? []);
        return note && `${note} Generate the night again under Plans and publish it.`;
      })(),
      shortKwh: short.map((s) => `${num(s.shortfallKwh)} kWh`),
    };
  });

  /** The chargers as loaded, with the live state the stream has said since. */
  protected readonly liveChargers = computed(() => {
    const list = this.detail()?.chargers ?? [];
    return this.live()?.withLive(list) ?? list;
  });
  protected readonly timezone = computed(() => this.detail()?.timezone ?? this.depots.current()?.timezone ?? 'UTC');
  /** Whether what the chargers card shows follows them as they report. */
  protected readonly liveNote = computed(() => {
    switch (this.live()?.connection()) {
      case 'open':
        return 'Live: changes show as the chargers report them';
      case 'waiting':
        return 'As the chargers last reported: live updates reconnecting';
      default:
        return 'As the chargers last reported';
    }
  });
  protected readonly faultCount = computed(() => faultsOf(this.liveChargers(), this.timezone()).length);

  protected readonly chargers = computed(() =>
    [...this.liveChargers()]
      .sort((a, b) => naturalCompare(a.label, b.label))
      .map((c) => {
        const out = outAt(c, new Date(this.clock.tick()), this.timezone());
        const state = liveStateOf(c, out);
        const info = LIVE_STATES.find((s) => s.state === state)!;
        return {
          id: c.id,
          label: c.label,
          state,
          stateLabel: info.label,
          icon: info.icon,
          power: state === 'charging' && c.live?.powerKw != null ? `${num(c.live.powerKw)} kW` : null,
          // Offline: whether the charger has ever reported to Nightyard, and when it last did.
          heard:
            state !== 'offline'
              ? null
              : c.live?.seenAt
                ? `last heard ${when(c.live.seenAt, this.timezone())}`
                : 'not heard from yet',
          // Out of service and charging or faulted: the state says the one, this the other.
          outOfService: out && state !== 'out',
        };
      }),
  );
  protected readonly counts = computed(() => {
    const now = new Date(this.clock.tick());
    return liveCounts(this.liveChargers(), (c) => outAt(c, now, this.timezone()));
  });
  protected readonly faulted = computed(() => this.chargers().filter((c) => c.state === 'faulted').length);
  protected readonly offline = computed(() => this.counts().find((c) => c.state === 'offline')?.count ?? 0);

  private run = 0;
  /** Tonight's service date at the depot, as the server says. */
  private readonly tonightDate = computed(() => {
    const depot = this.depots.current();
    return depot ? this.nights.tonightOf(depot) : null;
  });
  /** The night the page last looked from. */
  private loadedFor: string | null = null;

  /** The depot the page reads, as the night sees it: a refreshed list of the same depot is no change. */
  private readonly depot = computed(() => this.depots.current(), {
    equal: (a, b) => a?.id === b?.id && a?.timezone === b?.timezone,
  });

  constructor() {
    // The card's counts may have changed since the list was loaded (a report from the Yard).
    void this.depots.refresh();
    effect(() => {
      const depot = this.depot();
      if (depot) untracked(() => this.load(depot));
    });
    // When tonight's night is over, the server names the next one: look again.
    effect(() => {
      const tonight = this.tonightDate();
      const depot = this.depot();
      if (depot && tonight && this.loadedFor && tonight !== this.loadedFor) untracked(() => this.load(depot));
    });
  }

  protected reload(): void {
    const depot = this.depots.current();
    if (depot) this.load(depot);
    void this.depots.refresh();
  }

  private load(depot: NightDepot): void {
    if (this.live()?.depotId !== depot.id) {
      const live = this.liveStore.watch(depot.id, this.destroyRef);
      this.live.set(live);
      this.liveReload?.destroy();
      this.liveReload = reloadOnLive(live, () => this.reload(), this.injector);
    }
    const run = ++this.run;
    void this.loadPlan(run, depot);
    void this.loadChargers(run, depot.id);
  }

  /** Walks back from tonight (the server's) to the first night with a published plan, then reads it. */
  private async loadPlan(run: number, depot: NightDepot): Promise<void> {
    const depotId = depot.id;
    this.planState.set('loading');
    this.planError.set(null);
    try {
      await this.nights.load(depot);
      const tonight = this.nights.tonightOf(depot);
      if (run !== this.run) return;
      if (!tonight) {
        this.planError.set(this.nights.error() ?? 'Which night it is at the depot could not be found out.');
        this.planState.set('failed');
        return;
      }
      this.loadedFor = tonight;
      this.tonight.set(tonight);
      let found: PlanDetail | null = null;
      for (const date of candidateNights(tonight)) {
        const published = (await this.api.list(depotId, date)).find((p) => p.state === 'published');
        if (run !== this.run) return;
        if (published) {
          found = await this.api.plan(published.id);
          break;
        }
      }
      if (run !== this.run) return;
      this.plan.set(found);
      this.planState.set('loaded');
    } catch (err) {
      if (run !== this.run) return;
      this.planError.set(toApiProblem(err).message);
      this.planState.set('failed');
    }
  }

  private async loadChargers(run: number, depotId: string): Promise<void> {
    this.detailState.set('loading');
    this.detailError.set(null);
    try {
      const detail = await this.api.depot(depotId);
      if (run !== this.run) return;
      this.detail.set(detail);
      this.detailState.set('loaded');
    } catch (err) {
      if (run !== this.run) return;
      this.detailError.set(toApiProblem(err).message);
      this.detailState.set('failed');
    }
  }
}
