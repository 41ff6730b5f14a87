import type { Clock } from '../time/clock';

export type LiveValues = Partial<{ liveConnected: boolean; liveStatus: string; livePowerW: number | null }>;

/**
 * One charger's live-state writes: one in flight at a time, later values replace pending ones
 * (latest wins), and a bare heartbeat writes at most once per `touchEveryMs`. A charger sending
 * thousands of messages costs a handful of UPDATEs, not thousands of concurrent ones.
 */
export class LiveStateWriter {
  private pending: LiveValues | null = null;
  private running: Promise<void> | null = null;
  private lastWriteMs = Number.NEGATIVE_INFINITY;

  constructor(
    private readonly write: (values: LiveValues) => Promise<void>,
    private readonly clock: Clock,
    private readonly touchEveryMs = 5_000,
  ) {}

  /** A change of state: written as soon as the write before it has finished. */
  set(values: LiveValues): void {
    this.pending = { ...this.pending, ...values };
    this.running ??= this.drain();
  }

  /** Proof of life only (a Heartbeat): refreshes "seen at" at most once per interval. */
  touch(): void {
    if (this.pending || this.clock().getTime() - this.lastWriteMs >= this.touchEveryMs) this.set({});
  }

  /** Resolves once nothing is pending or in flight. */
  async settled(): Promise<void> {
    while (this.running) await this.running;
  }

  private async drain(): Promise<void> {
    try {
      while (this.pending) {
        const values = this.pending;
        this.pending = null;
        this.lastWriteMs = this.clock().getTime();
        // `write` logs and swallows its own failures: the next change simply tries again.
        await this.write(values).catch(() => undefined);
      }
    } finally {
      this.running = null;
    }
  }
}
