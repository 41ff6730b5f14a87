/* eslint-disable no-restricted-syntax -- the web app's one clock: the only place that reads the device's time */
import { DestroyRef, Injectable, computed, inject, signal } from '@angular/core';
import { depotDate } from '@nightyard/contracts/depot-time';

/** How often `tick` moves on: often enough for "now" lines and overdue states, cheap on phones. */
export const CLOCK_TICK_MS = 30_000;
/** Offsets closer than this to the one in use are network jitter, not a wrong clock. */
const JITTER_MS = 1_000;

/**
 * The app's one clock. It follows the server (every API answer carries `X-Server-Time`), so a
 * phone or laptop whose clock is wrong, by minutes or by days, still shows the right night and
 * the right "now". Read `now()` for an instant; read `tick()` in a `computed` to move on with time.
 */
@Injectable({ providedIn: 'root' })
export class Clock {
  /** Server time minus this device's time. */
  private readonly offset = signal(0);
  private readonly device = signal(Date.now());

  /** Milliseconds since the epoch on the server's clock, moving on every `CLOCK_TICK_MS`. */
  readonly tick = computed(() => this.device() + this.offset());
  readonly offsetMs = this.offset.asReadonly();

  constructor() {
    const timer = setInterval(() => this.refresh(), CLOCK_TICK_MS);
    inject(DestroyRef).onDestroy(() => clearInterval(timer));
  }

  /** The server's time now. */
  now(): Date {
    return new Date(this.nowMs());
  }

  nowMs(): number {
    return Date.now() + this.offset();
  }

  /** Today's date at the depot, `YYYY-MM-DD` (read in a `computed`, it moves on at midnight there). */
  todayAt(timeZone: string): string {
    return depotDate(this.tick(), timeZone);
  }

  /** Moves `tick` on at once (after a wake-up from sleep, say). */
  refresh(): void {
    this.device.set(Date.now());
  }

  /**
   * Takes the server's time from an answer. `roundTripMs` is how long the request took: the
   * server stamped it about halfway, so its clock reads that much more by now.
   */
  setServerTime(serverMs: number, roundTripMs = 0): void {
    if (!Number.isFinite(serverMs)) return;
    const offset = Math.round(serverMs + Math.max(0, roundTripMs) / 2 - Date.now());
    if (Math.abs(offset - this.offset()) < JITTER_MS) return;
    this.offset.set(offset);
    this.refresh();
  }
}
