import { DOCUMENT, DestroyRef, Injectable, computed, inject, signal } from '@angular/core';
import { AuthStore } from '../auth/auth-store';
import { toApiProblem } from '../core/api-error';
import { Clock } from '../core/clock';
import { YardApi, type YardConfirmation } from './yard-api';
import type { OutboxState } from './yard-format';

/** A confirmation the yard has made and the server has not yet answered for good. */
export interface OutboxEntry {
  planId: string;
  stepKey: string;
  /** Who confirmed: another person signing in on the same tablet does not send it as theirs. */
  userId: string;
  queuedAt: string;
  /** When it really happened, depot time `HH:mm`, for a step confirmed late (absent: when sent). */
  at?: string;
}

export type OutboxOutcome =
  { stepKey: string; saved: YardConfirmation } | { stepKey: string; failed: { status: number; message: string } };

export const OUTBOX_STORAGE_KEY = 'nightyard.yard.outbox';
/** Waits between attempts while the network is down (the last one repeats). */
export const RETRY_DELAYS_MS: readonly number[] = [1_000, 2_000, 5_000, 10_000, 20_000, 30_000];

/** Answers that no retry can change: the message is shown and the confirmation dropped. */
const isFinal = (status: number) => status >= 400 && status < 500 && ![401, 408, 429].includes(status);
const id = (e: Pick<OutboxEntry, 'planId' | 'stepKey'>) => `${e.planId}|${e.stepKey}`;

/**
 * Confirmations are queued in localStorage first and sent until the server answers, so a network
 * that drops mid-request (or a closed tab) loses none. Sending again is safe: the API stores the
 * same confirmation once and answers with the first one.
 */
@Injectable({ providedIn: 'root' })
export class ConfirmationOutbox {
  private readonly api = inject(YardApi);
  private readonly auth = inject(AuthStore);
  private readonly clock = inject(Clock);
  private readonly window = inject(DOCUMENT).defaultView;
  private readonly storage: Storage | null = this.window?.localStorage ?? null;

  private readonly entries = signal<readonly OutboxEntry[]>(this.read());
  private readonly states = signal<Readonly<Record<string, OutboxState>>>({});
  private readonly listeners = new Set<(outcome: OutboxOutcome) => void>();
  private readonly inFlight = new Set<string>();
  private timer: ReturnType<typeof setTimeout> | undefined;
  private attempts = 0;

  /** The signed-in person's confirmations still waiting for the server. */
  readonly pending = computed(() => this.entries().filter((e) => e.userId === this.auth.user()?.id));

  constructor() {
    const online = () => this.flush();
    this.window?.addEventListener('online', online);
    inject(DestroyRef).onDestroy(() => {
      clearTimeout(this.timer);
      this.window?.removeEventListener('online', online);
    });
    for (const e of this.entries()) this.setState(e.stepKey, { state: 'saving', retrying: false, message: null });
  }

  /** What the yard sees next to a step: saving…, saved, or why it was not saved. */
  stateOf(stepKey: string): OutboxState | null {
    return this.states()[stepKey] ?? null;
  }

  /** Called with each confirmation the server has answered for good; returns an unsubscribe. */
  onSettled(listener: (outcome: OutboxOutcome) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  /** Queues a confirmation (with the time it happened, for a late one) and sends it at once. */
  confirm(planId: string, stepKey: string, at?: string): void {
    const userId = this.auth.user()?.id;
    if (!userId) return;
    if (!this.entries().some((e) => id(e) === id({ planId, stepKey }))) {
      const entry: OutboxEntry = {
        planId,
        stepKey,
        userId,
        queuedAt: this.clock.now().toISOString(),
        ...(at ? { at } : {}),
      };
      this.entries.update((list) => [...list, entry]);
      this.write();
    }
    this.setState(stepKey, { state: 'saving', retrying: false, message: null });
    this.flush();
  }

  /** Sends every waiting confirmation of the signed-in person (again). */
  flush(): void {
    clearTimeout(this.timer);
    this.timer = undefined;
    for (const entry of this.pending()) {
      if (!this.inFlight.has(id(entry))) void this.send(entry);
    }
  }

  /** Forgets a final failure once the yard has read it. */
  clear(stepKey: string): void {
    this.states.update((s) => {
      const { [stepKey]: _gone, ...rest } = s;
      return rest;
    });
  }

  private async send(entry: OutboxEntry): Promise<void> {
    this.inFlight.add(id(entry));
    try {
      const saved = await this.api.confirm(entry.planId, entry.stepKey, entry.at);
      this.attempts = 0;
      this.remove(entry);
      this.setState(entry.stepKey, { state: 'saved', confirmedAt: saved.confirmedAt, confirmedBy: saved.confirmedBy });
      this.emit({ stepKey: entry.stepKey, saved });
    } catch (err) {
      const problem = toApiProblem(err);
      if (isFinal(problem.status)) {
        this.remove(entry);
        this.setState(entry.stepKey, { state: 'failed', message: problem.message });
        this.emit({ stepKey: entry.stepKey, failed: { status: problem.status, message: problem.message } });
      } else {
        this.setState(entry.stepKey, {
          state: 'saving',
          retrying: true,
          message:
            problem.status === 0
              ? 'No connection: kept on this device, sending again…'
              : 'Not saved yet: sending again…',
        });
        this.retryLater();
      }
    } finally {
      this.inFlight.delete(id(entry));
    }
  }

  private retryLater(): void {
    if (this.timer !== undefined) return;
    const delay = RETRY_DELAYS_MS[Math.min(this.attempts, RETRY_DELAYS_MS.length - 1)]!;
    this.attempts++;
    this.timer = setTimeout(() => this.flush(), delay);
  }

  private emit(outcome: OutboxOutcome): void {
    for (const listener of this.listeners) listener(outcome);
  }

  private setState(stepKey: string, state: OutboxState): void {
    this.states.update((s) => ({ ...s, [stepKey]: state }));
  }

  private remove(entry: OutboxEntry): void {
    this.entries.update((list) => list.filter((e) => id(e) !== id(entry)));
    this.write();
  }

  private read(): OutboxEntry[] {
    try {
      const raw: unknown = JSON.parse(this.storage?.getItem(OUTBOX_STORAGE_KEY) ?? '[]');
      return Array.isArray(raw)
        ? raw.filter(
            (e): e is OutboxEntry =>
              typeof e?.planId === 'string' && typeof e?.stepKey === 'string' && typeof e?.userId === 'string',
          )
        : [];
    } catch {
      return [];
    }
  }

  private write(): void {
    try {
      this.storage?.setItem(OUTBOX_STORAGE_KEY, JSON.stringify(this.entries()));
    } catch {
      // Storage full or disabled: the confirmation is still sent and retried while the page is open.
    }
  }
}
