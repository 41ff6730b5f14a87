import type { Logger } from 'pino';
import type { LiveEvent } from '@nightyard/contracts';

export type LiveListener = (event: LiveEvent) => void;

export interface LiveStreamTiming {
  /** A comment line this often keeps proxies and the browser from closing an idle stream. */
  heartbeatMs: number;
  /**
   * A stream ends after this long and the client opens a new one: the new request is checked
   * with the caller's current token (roles may have changed) and starts with a fresh snapshot.
   */
  maxMs: number;
  /** Streams one person may hold open at once (tabs, devices). */
  perUser: number;
}
export const DEFAULT_LIVE_TIMING: LiveStreamTiming = { heartbeatMs: 15_000, maxMs: 5 * 60_000, perUser: 10 };

/**
 * The API process's in-memory bus of live events, by depot: the OCPP central system and the
 * publish and report paths put events on it, each open live stream of that depot takes them off.
 * A listener that throws is logged and the others still get the event. Events exist only in this
 * process: the central system and the routes that publish plans both run in the API process.
 */
export class LiveBus {
  private readonly byDepot = new Map<string, Set<LiveListener>>();
  private readonly streamsByUser = new Map<string, number>();
  /** How to end each open stream (shutdown, a person's access changed), with whose stream it is. */
  private readonly enders = new Map<() => void, string | undefined>();

  constructor(
    private readonly log?: Logger,
    readonly timing: LiveStreamTiming = DEFAULT_LIVE_TIMING,
  ) {}

  /** Counts a stream of the user; false when they already hold as many as allowed. */
  openStream(userId: string): boolean {
    const n = this.streamsByUser.get(userId) ?? 0;
    if (n >= this.timing.perUser) return false;
    this.streamsByUser.set(userId, n + 1);
    return true;
  }

  closeStream(userId: string): void {
    const n = (this.streamsByUser.get(userId) ?? 1) - 1;
    if (n > 0) this.streamsByUser.set(userId, n);
    else this.streamsByUser.delete(userId);
  }

  /** Listens to one depot's events; call the answer to stop. */
  subscribe(depotId: string, listener: LiveListener): () => void {
    let set = this.byDepot.get(depotId);
    if (!set) this.byDepot.set(depotId, (set = new Set()));
    set.add(listener);
    return () => {
      set.delete(listener);
      if (!set.size && this.byDepot.get(depotId) === set) this.byDepot.delete(depotId);
    };
  }

  publish(depotId: string, event: LiveEvent): void {
    for (const listener of [...(this.byDepot.get(depotId) ?? [])]) {
      try {
        listener(event);
      } catch (err) {
        this.log?.warn({ err, depotId, type: event.type }, 'live listener failed');
      }
    }
  }

  /** Registers how to end a stream (of `userId`); call the answer once it has ended. */
  trackStream(end: () => void, userId?: string): () => void {
    this.enders.set(end, userId);
    return () => this.enders.delete(end);
  }

  /** Ends every open stream (on shutdown, so the HTTP server can close; clients reconnect elsewhere). */
  endStreams(): void {
    for (const end of [...this.enders.keys()]) end();
  }

  /**
   * Ends one person's open streams: their depots, roles or status changed, so their client
   * reconnects and the new request is checked with what they may see now.
   */
  endStreamsOf(userId: string): void {
    for (const [end, of] of [...this.enders]) if (of === userId) end();
  }

  /** Open listeners (of one depot, or of all). */
  listenerCount(depotId?: string): number {
    if (depotId) return this.byDepot.get(depotId)?.size ?? 0;
    let n = 0;
    for (const set of this.byDepot.values()) n += set.size;
    return n;
  }
}
