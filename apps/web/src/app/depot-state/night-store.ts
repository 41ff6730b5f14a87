import { HttpClient } from '@angular/common/http';
import { Injectable, computed, effect, inject, signal, untracked } from '@angular/core';
import type { DepotNight, DepotSummary } from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';
import { toApiProblem } from '../core/api-error';
import { Clock } from '../core/clock';
import { depotDate } from '@nightyard/contracts/depot-time';

type LoadState = 'idle' | 'loading' | 'loaded' | 'failed';
export type NightDepot = Pick<DepotSummary, 'id' | 'timezone'>;

/**
 * Which night it is at a depot (GET /api/depots/:id/night). The server decides, so every page,
 * e-mail and plan means the same night by "tonight", after midnight too. The answer holds until
 * tonight's night ends; then it is asked again.
 */
@Injectable({ providedIn: 'root' })
export class NightStore {
  private readonly http = inject(HttpClient);
  private readonly clock = inject(Clock);

  private readonly depot = signal<NightDepot | null>(null);
  private readonly answer = signal<{ depotId: string; night: DepotNight } | null>(null);
  readonly state = signal<LoadState>('idle');
  readonly error = signal<string | null>(null);

  /** The answer for the depot last asked about. */
  readonly night = computed(() => {
    const a = this.answer();
    return a && a.depotId === this.depot()?.id ? a.night : null;
  });

  private pending: { depotId: string; promise: Promise<void> } | null = null;
  /** The end of the night last reloaded for: one reload per night, even if the answer lags. */
  private reloadedAfter: string | null = null;

  constructor() {
    effect(() => {
      const night = this.night();
      const depot = this.depot();
      if (!night || !depot || this.clock.tick() < Date.parse(night.tonight.end)) return;
      if (this.reloadedAfter === night.tonight.end) return;
      this.reloadedAfter = night.tonight.end;
      untracked(() => void this.load(depot, true));
    });
  }

  /**
   * Tonight's service date at the depot (`YYYY-MM-DD`): the server's answer; null until it comes.
   * Should the API not answer, the depot's date today keeps the page usable.
   */
  tonightOf(depot: NightDepot): string | null {
    const a = this.answer();
    if (a && a.depotId === depot.id) return a.night.tonight.serviceDate;
    if (this.state() === 'failed' && this.depot()?.id === depot.id) return depotDate(this.clock.tick(), depot.timezone);
    return null;
  }

  /** Asks the server unless its answer for this depot still holds; `force` asks again. */
  load(depot: NightDepot, force = false): Promise<void> {
    this.depot.set(depot);
    if (!force) {
      if (this.pending?.depotId === depot.id) return this.pending.promise;
      const a = this.answer();
      if (a?.depotId === depot.id && this.clock.nowMs() < Date.parse(a.night.tonight.end)) return Promise.resolve();
    }
    this.state.set('loading');
    this.error.set(null);
    const promise = firstValueFrom(
      this.http.get<DepotNight | { night: DepotNight }>(`/api/depots/${encodeURIComponent(depot.id)}/night`),
    )
      .then(
        (body) => {
          // The contract's object itself; read a `{ night }` envelope too, as other routes answer.
          const night = body && 'tonight' in body ? body : body?.night;
          if (!night?.tonight) {
            this.error.set('The server did not say which night it is.');
            this.state.set('failed');
            return;
          }
          this.answer.set({ depotId: depot.id, night });
          this.state.set('loaded');
        },
        (err: unknown) => {
          this.error.set(toApiProblem(err).message);
          this.state.set('failed');
        },
      )
      .finally(() => {
        if (this.pending?.promise === promise) this.pending = null;
      });
    this.pending = { depotId: depot.id, promise };
    return promise;
  }
}
