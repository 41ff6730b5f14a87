import { DOCUMENT, DestroyRef, Injectable, Injector, computed, inject, signal, type EffectRef } from '@angular/core';
import type { Charger, Tonight, YardReportResult, YardSession } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { Clock } from '../core/clock';
import { outAt, outPeriod } from '../depot-state/charger-out';
import { LiveStore, reloadOnLive, type LiveDepot } from '../depot-state/live-store';
import { ConfirmationOutbox } from './confirmation-outbox';
import { YardApi } from './yard-api';
import {
  liveView,
  naturalCompare,
  nextHour,
  nextSteps,
  overdueSteps,
  revisionNotice,
  spansDays,
  stepViews,
  type Horizon,
  type LiveView,
  type StepView,
} from './yard-format';

/**
 * How often the page asks for tonight again (steps confirmed on other devices). Charger states,
 * publications and revisions arrive over the live stream; while it is open only every
 * `LIVE_POLL_EVERY`th poll is made.
 */
export const POLL_MS = 20_000;
export const LIVE_POLL_EVERY = 3;
/** How often the now-line and overdue states move on between polls. */
const TICK_MS = 15_000;
const SEEN_KEY = 'nightyard.yard.seen';

export interface ChargerView {
  label: string;
  charger: Charger | null;
  live: LiveView;
  /** Out of service now (one out for a period only inside it). */
  outOfService: boolean;
  /** Out for a period that is still to come ("from 2026-12-05 00:00 until 2026-12-06 12:00"), else null. */
  outLater: string | null;
  statusReason: string | null;
  sessions: YardSession[];
  steps: StepView[];
  /** The step due now, or the next one (never an overdue one). */
  next: StepView | null;
  /** Overdue steps, oldest first, each to confirm with its real time or mark as not done. */
  overdue: StepView[];
}

export interface Notice {
  text: string;
  moved: string[];
  /** What the revision does to the night (cost, buses left short), from the report's answer. */
  effect?: string[];
  version: number;
  /** The revision answers a report or "did not happen" made on this page (the page shows it). */
  mine?: boolean;
}

interface Seen {
  depotId: string;
  serviceDate: string;
  version: number;
}

/**
 * Tonight at one depot for the Yard page: the plan, steps and chargers, the clock (the server's),
 * polling, the shift's acknowledgement and the notice shown when the plan changes version.
 */
@Injectable()
export class YardStore {
  private readonly api = inject(YardApi);
  private readonly outbox = inject(ConfirmationOutbox);
  private readonly document = inject(DOCUMENT);
  private readonly storage: Storage | null = this.document.defaultView?.localStorage ?? null;

  readonly depotId = signal<string | null>(null);
  readonly tonight = signal<Tonight | null>(null);
  readonly chargers = signal<readonly Charger[]>([]);
  /** The depot's live stream (charger states as they change, publications, revisions). */
  readonly live = signal<LiveDepot | null>(null);
  /** The chargers as loaded, with the live state the stream has said since. */
  readonly liveChargers = computed(() => this.live()?.withLive(this.chargers()) ?? this.chargers());
  readonly state = signal<'idle' | 'loading' | 'loaded' | 'failed'>('idle');
  readonly error = signal<string | null>(null);
  /** A message about the last action (a confirmation refused, a reload that failed). */
  readonly problem = signal<string | null>(null);
  readonly notice = signal<Notice | null>(null);
  readonly acknowledging = signal(false);

  /** The app's clock follows the server's, so a wrong phone clock does not move the now-line. */
  private readonly clock = inject(Clock);
  /** The yard moves on more often than the app's clock ticks. */
  private readonly beat = signal(0);
  readonly now = computed(() => {
    this.beat();
    this.clock.tick();
    return this.clock.nowMs();
  });

  readonly timezone = computed(() => this.tonight()?.depot.timezone ?? 'UTC');
  readonly plan = computed(() => this.tonight()?.plan ?? null);
  readonly horizon = computed<Horizon | null>(() => {
    return this.plan()?.horizon ?? null;
  });
  /** Before the night's first slot: the page says when it starts. */
  readonly upcoming = computed(() => {
    const h = this.horizon();
    return h !== null && this.now() < h.start;
  });
  readonly acknowledged = computed(() => this.tonight()?.acknowledged ?? false);

  readonly steps = computed<StepView[]>(() => {
    const t = this.tonight();
    if (!t) return [];
    return stepViews(
      t.steps,
      this.now(),
      t.depot.timezone,
      (key) => this.outbox.stateOf(key),
      spansDays(t.plan?.horizon),
    );
  });

  readonly chargerViews = computed<ChargerView[]>(() => {
    const t = this.tonight();
    if (!t?.plan) return [];
    const tz = t.depot.timezone;
    const sessions = t.plan.sessions;
    const byLabel = new Map(this.liveChargers().map((c) => [c.label, c]));
    const labels = [...new Set([...byLabel.keys(), ...sessions.map((s) => s.charger)])].sort(naturalCompare);
    const steps = this.steps();
    const next = nextSteps(steps);
    const now = this.now();
    return labels.map((label) => {
      const charger = byLabel.get(label) ?? null;
      const outNow = charger ? outAt(charger, new Date(now), tz) : false;
      return {
        label,
        charger,
        live: liveView(charger, tz, outNow),
        outOfService: outNow,
        outLater: charger?.status === 'out_of_service' && charger.outFrom && !outNow ? outPeriod(charger) : null,
        statusReason: charger?.statusReason ?? null,
        sessions: sessions.filter((s) => s.charger === label),
        steps: steps.filter((s) => s.step.charger === label),
        next: next.get(label) ?? null,
        overdue: overdueSteps(steps.filter((s) => s.step.charger === label)),
      };
    });
  });

  /** Steps across all chargers due in the next hour, in time order (for a crew of one or two). */
  readonly nextHour = computed(() => nextHour(this.steps(), this.now()));

  /** Steps being reported as not done (the server re-plans meanwhile). */
  readonly missing = signal<ReadonlySet<string>>(new Set());

  /** Buses of tonight's plan (for the report form). */
  readonly buses = computed(() => {
    const plan = this.plan();
    if (!plan) return [];
    return [...new Set([...Object.keys(plan.busCapacityKwh), ...plan.sessions.map((s) => s.bus)])].sort(naturalCompare);
  });

  private pending: Promise<void> | null = null;
  private again = false;
  private readonly liveStore = inject(LiveStore);
  private readonly destroyRef = inject(DestroyRef);
  private readonly injector = inject(Injector);
  private liveReload: EffectRef | null = null;
  private polls = 0;

  constructor() {
    const ticker = setInterval(() => this.beat.update((n) => n + 1), TICK_MS);
    const poller = setInterval(() => {
      if (this.live()?.connection() === 'open' && ++this.polls % LIVE_POLL_EVERY !== 0) return;
      void this.load();
    }, POLL_MS);
    const visible = () => {
      if (this.document.visibilityState === 'visible') {
        void this.load();
        this.outbox.flush();
      }
    };
    this.document.addEventListener('visibilitychange', visible);
    const off = this.outbox.onSettled((outcome) => {
      if ('failed' in outcome) this.problem.set(`Step not confirmed. ${outcome.failed.message}`);
      void this.load();
    });
    inject(DestroyRef).onDestroy(() => {
      clearInterval(ticker);
      clearInterval(poller);
      this.document.removeEventListener('visibilitychange', visible);
      off();
    });
  }

  /** Starts on a depot: loads tonight and sends any confirmation still waiting on this device. */
  start(depotId: string): Promise<void> {
    if (this.depotId() !== depotId) {
      this.depotId.set(depotId);
      this.tonight.set(null);
      this.state.set('idle');
      const live = this.liveStore.watch(depotId, this.destroyRef);
      this.live.set(live);
      this.liveReload?.destroy();
      this.liveReload = reloadOnLive(live, () => void this.load(), this.injector);
    }
    this.outbox.flush();
    return this.load();
  }

  /** Loads tonight and the chargers' live states; calls made meanwhile run once more after it. */
  load(): Promise<void> {
    const depotId = this.depotId();
    if (!depotId) return Promise.resolve();
    if (this.pending) {
      this.again = true;
      return this.pending;
    }
    if (!this.tonight()) this.state.set('loading');
    this.pending = this.fetch(depotId).finally(() => {
      this.pending = null;
      if (this.again) {
        this.again = false;
        void this.load();
      }
    });
    return this.pending;
  }

  async acknowledge(): Promise<void> {
    const depotId = this.depotId();
    if (!depotId || this.acknowledging()) return;
    this.acknowledging.set(true);
    this.problem.set(null);
    try {
      await this.api.acknowledge(depotId);
      this.tonight.update((t) => (t ? { ...t, acknowledged: true } : t));
    } catch (err) {
      this.problem.set(`The cautions could not be recorded. ${toApiProblem(err).message}`);
    } finally {
      this.acknowledging.set(false);
    }
  }

  /** Confirms a step now, or (overdue) at the depot time `at` it really happened. */
  confirm(step: StepView, at?: string): void {
    const plan = this.plan();
    if (!plan) return;
    this.problem.set(null);
    this.outbox.clear(step.step.key);
    this.outbox.confirm(plan.id, step.step.key, at);
  }

  /** A step that did not happen: the server re-plans and publishes; the notice says what moved. */
  async missed(step: StepView): Promise<void> {
    const plan = this.plan();
    const depotId = this.depotId();
    const key = step.step.key;
    if (!plan || !depotId || this.missing().has(key)) return;
    this.problem.set(null);
    this.missing.update((s) => new Set([...s, key]));
    try {
      const result = await this.api.missed(depotId, plan.id, key);
      await this.reported(result);
    } catch (err) {
      this.problem.set(`Not re-planned: ${step.title}. ${toApiProblem(err).message}`);
      void this.load();
    } finally {
      this.missing.update((s) => new Set([...s].filter((k) => k !== key)));
    }
  }

  /** After a report: the revision's notice (with what moved) and the new timeline. */
  async reported(result: YardReportResult): Promise<void> {
    const version = result.revision.version;
    // The live stream may have brought the revision (and its notice) in before this answer.
    const heard = this.notice();
    this.notice.set({
      text: heard?.version === version ? heard.text : `Plan revised (version ${version}).`,
      moved: movedLines(result),
      effect: result.effect.lines,
      version,
      mine: true,
    });
    await this.load();
  }

  /** "Got it": the notice is gone, and stays gone after a reload, until the next version. */
  dismissNotice(): void {
    const notice = this.notice();
    const t = this.tonight();
    this.notice.set(null);
    if (notice && t?.plan)
      this.writeSeen({ depotId: t.depot.id, serviceDate: t.plan.serviceDate, version: notice.version });
  }

  private async fetch(depotId: string): Promise<void> {
    const sentAt = performance.now();
    const [tonight, depot] = await Promise.allSettled([this.api.tonight(depotId), this.api.depot(depotId)]);
    // The page moved to another depot meanwhile: this answer is of the depot before.
    if (this.depotId() !== depotId) return;
    if (depot.status === 'fulfilled') this.chargers.set(depot.value.chargers);
    if (tonight.status === 'rejected') {
      const message = toApiProblem(tonight.reason).message;
      if (this.tonight()) this.problem.set(`Could not refresh tonight's plan. ${message}`);
      else {
        this.error.set(message);
        this.state.set('failed');
      }
      return;
    }
    const t = tonight.value;
    // The answer's own "now" sets the clock too (the same server's time as its header).
    this.clock.setServerTime(Date.parse(t.now), performance.now() - sentAt);
    this.beat.update((n) => n + 1);
    this.noticeIfRevised(t);
    this.tonight.set(t);
    this.error.set(null);
    this.state.set('loaded');
  }

  /**
   * A plan of the same night with a higher version than the person last acknowledged ("Got it",
   * kept in the browser), else than the one first seen: the notice stays through reloads until
   * acknowledged. A first look at a night has nothing to tell.
   */
  private noticeIfRevised(t: Tonight): void {
    const plan = t.plan;
    if (!plan) return;
    const stored = this.readSeen();
    const thisNight = stored && stored.depotId === t.depot.id && stored.serviceDate === plan.serviceDate;
    const before = this.tonight()?.plan;
    const seen = thisNight
      ? stored
      : before && before.serviceDate === plan.serviceDate
        ? { depotId: t.depot.id, serviceDate: before.serviceDate, version: before.version }
        : null;
    if (!thisNight)
      this.writeSeen(seen ?? { depotId: t.depot.id, serviceDate: plan.serviceDate, version: plan.version });
    if (!seen || plan.version <= seen.version) return;
    const mine = this.notice();
    if (mine?.version === plan.version && mine.text !== `Plan revised (version ${plan.version}).`) return;
    this.notice.set({
      text: revisionNotice(plan, t.depot.timezone),
      moved: mine?.version === plan.version ? mine.moved : [],
      ...(mine?.version === plan.version && mine.effect ? { effect: mine.effect } : {}),
      version: plan.version,
      mine: mine?.version === plan.version && mine.mine,
    });
  }

  private readSeen(): Seen | null {
    try {
      const raw = JSON.parse(this.storage?.getItem(SEEN_KEY) ?? 'null') as Seen | null;
      return raw && typeof raw.version === 'number' ? raw : null;
    } catch {
      return null;
    }
  }

  private writeSeen(seen: Seen): void {
    try {
      this.storage?.setItem(SEEN_KEY, JSON.stringify(seen));
    } catch {
      // Without storage the notice still shows for revisions seen while the page is open.
    }
  }
}

export function movedLines(result: YardReportResult): string[] {
  return result.moved.map((m) => `Bus ${m.bus}: ${m.before} → ${m.after}`);
}
