import { HttpErrorResponse } from '@angular/common/http';
import {
  type DestroyRef,
  type EffectRef,
  Injectable,
  type Injector,
  effect,
  inject,
  signal,
  untracked,
} from '@angular/core';
import type { Charger, LiveCharger, LiveEvent } from '@nightyard/contracts';
import type { Subscription } from 'rxjs';
import { LiveTransport } from './live-transport';

export type LiveConnection = 'connecting' | 'open' | 'waiting' | 'stopped';
export type LivePlanEvent = Extract<LiveEvent, { type: 'plan' }>;
export type LiveNoticeEvent = Extract<LiveEvent, { type: 'notice' }>;

/** Waits before reconnecting: doubling from the first to the longest, each within ±20 %. */
export const RECONNECT = { firstMs: 1000, maxMs: 30_000 } as const;
/** How long a stream stays open after its last page left (moving between pages keeps it). */
export const LINGER_MS = 10_000;

export function reconnectDelay(attempt: number, random: () => number = Math.random): number {
  const base = Math.min(RECONNECT.maxMs, RECONNECT.firstMs * 2 ** Math.max(0, attempt));
  return Math.round(base * (0.8 + 0.4 * random()));
}

/** Answers that will not change by asking again: the depot is gone or the role may not see it. */
function isFinal(err: unknown): boolean {
  return err instanceof HttpErrorResponse && (err.status === 403 || err.status === 404);
}

/** What the live stream of one depot has said, as signals for the pages. */
export class LiveDepot {
  readonly chargers = signal<ReadonlyMap<string, LiveCharger>>(new Map());
  readonly connection = signal<LiveConnection>('connecting');
  /** The last publication or revision heard while the page was open (pages reload on it). */
  readonly plan = signal<LivePlanEvent | null>(null);
  /** The last report from the yard heard. */
  readonly notice = signal<LiveNoticeEvent | null>(null);
  /**
   * Counts the snapshots: each (re)connection starts with one. Above 1 the stream was away for a
   * while, and a page reloads what a missed event may have changed.
   */
  readonly generation = signal(0);

  constructor(readonly depotId: string) {}

  apply(event: LiveEvent): void {
    switch (event.type) {
      case 'snapshot':
        this.chargers.set(new Map(event.chargers.map((c) => [c.chargerId, c])));
        this.generation.update((n) => n + 1);
        break;
      case 'charger':
        this.chargers.update((m) => new Map(m).set(event.charger.chargerId, event.charger));
        break;
      case 'plan':
        this.plan.set(event);
        break;
      case 'notice':
        this.notice.set(event);
        break;
    }
  }

  /** The chargers with their `live` state as the stream last said (newer than the page's load). */
  withLive<T extends Pick<Charger, 'id' | 'live'>>(list: readonly T[]): T[] {
    const live = this.chargers();
    return list.map((c) => {
      const l = live.get(c.id);
      return l ? { ...c, live: { status: l.status, powerKw: l.powerKw, seenAt: l.seenAt } } : c;
    });
  }
}

/**
 * Calls `reload` when the stream tells of a publication or revision, or has come back after being
 * away (a publication may have been missed meanwhile); not for what was already known when called.
 */
export function reloadOnLive(depot: LiveDepot, reload: () => void, injector: Injector): EffectRef {
  let plan = untracked(depot.plan);
  let generation = Math.max(1, untracked(depot.generation));
  return effect(
    () => {
      const p = depot.plan();
      const g = depot.generation();
      const changed = p !== plan || g > generation;
      plan = p;
      generation = Math.max(generation, g);
      if (changed) untracked(reload);
    },
    { injector },
  );
}

interface Entry {
  depot: LiveDepot;
  users: number;
  attempt: number;
  sub: Subscription | null;
  retry: ReturnType<typeof setTimeout> | null;
  linger: ReturnType<typeof setTimeout> | null;
}

/**
 * One live stream per depot for the whole app, shared by the pages that show it (Tonight, Yard,
 * Depot). It opens with the first page that watches the depot, reconnects with a growing wait
 * when the stream fails or ends (a fresh snapshot each time), and closes a little after the last
 * page has left.
 */
@Injectable({ providedIn: 'root' })
export class LiveStore {
  private readonly transport = inject(LiveTransport);
  private readonly entries = new Map<string, Entry>();
  /** Replaced in tests for fixed waits. */
  random: () => number = Math.random;

  /** Watches a depot until `destroyRef` (the page) is destroyed. */
  watch(depotId: string, destroyRef: DestroyRef): LiveDepot {
    let entry = this.entries.get(depotId);
    if (!entry) {
      entry = { depot: new LiveDepot(depotId), users: 0, attempt: 0, sub: null, retry: null, linger: null };
      this.entries.set(depotId, entry);
    }
    const e = entry;
    e.users++;
    if (e.linger) {
      clearTimeout(e.linger);
      e.linger = null;
    }
    if (!e.sub && !e.retry) this.connect(e);
    let released = false;
    destroyRef.onDestroy(() => {
      if (released) return;
      released = true;
      this.release(e);
    });
    return e.depot;
  }

  private connect(e: Entry): void {
    e.retry = null;
    e.depot.connection.set('connecting');
    let done = false;
    const sub = this.transport.open(e.depot.depotId).subscribe({
      next: (event) => {
        e.attempt = 0;
        e.depot.connection.set('open');
        e.depot.apply(event);
      },
      error: (err: unknown) => {
        done = true;
        e.sub = null;
        if (isFinal(err)) e.depot.connection.set('stopped');
        else this.again(e);
      },
      complete: () => {
        done = true;
        e.sub = null;
        this.again(e);
      },
    });
    if (!done) e.sub = sub;
  }

  /** The stream ended or failed: try again after a wait that grows while nothing gets through. */
  private again(e: Entry): void {
    if (e.users === 0) return;
    e.depot.connection.set('waiting');
    const delay = reconnectDelay(e.attempt++, this.random);
    e.retry = setTimeout(() => {
      e.retry = null;
      // No page watches any more (it may come back while the stream lingers: it connects then).
      if (e.users > 0) this.connect(e);
    }, delay);
  }

  private release(e: Entry): void {
    e.users--;
    if (e.users > 0) return;
    e.linger = setTimeout(() => this.close(e), LINGER_MS);
  }

  private close(e: Entry): void {
    e.linger = null;
    e.sub?.unsubscribe();
    e.sub = null;
    if (e.retry) clearTimeout(e.retry);
    e.retry = null;
    e.attempt = 0;
    e.depot.connection.set('connecting');
    this.entries.delete(e.depot.depotId);
  }

  /**
   * Closes at once the streams no page watches any more (after a depot switch the depot before
   * is not shown again soon, so its stream does not linger).
   */
  closeIdle(): void {
    for (const e of [...this.entries.values()]) {
      if (e.users > 0) continue;
      if (e.linger) clearTimeout(e.linger);
      this.close(e);
    }
  }

  /** Streams open now (tests). */
  openStreams(): number {
    return [...this.entries.values()].filter((e) => e.sub !== null).length;
  }
}
