import { HttpClient } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import type { DepotSummary } from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';
import { toApiProblem } from '../core/api-error';

type LoadState = 'idle' | 'loading' | 'loaded' | 'failed';

/** The organisation's depots (GET /api/depots), loaded once per session. */
@Injectable({ providedIn: 'root' })
export class DepotListStore {
  private readonly http = inject(HttpClient);

  readonly depots = signal<readonly DepotSummary[]>([]);
  readonly state = signal<LoadState>('idle');
  readonly error = signal<string | null>(null);
  /** The depot the app works on. With several depots, the first one for now. */
  readonly current = computed<DepotSummary | null>(() => this.depots()[0] ?? null);

  private pending: Promise<void> | null = null;

  /** Loads unless already loaded or loading; `force` reloads. */
  load(force = false): Promise<void> {
    if (!force && (this.state() === 'loaded' || this.pending)) return this.pending ?? Promise.resolve();
    this.state.set('loading');
    this.error.set(null);
    this.pending = firstValueFrom(this.http.get<{ depots: DepotSummary[] }>('/api/depots'))
      .then(
        (res) => {
          this.depots.set(res.depots);
          this.state.set('loaded');
        },
        (err: unknown) => {
          this.error.set(toApiProblem(err).message);
          this.state.set('failed');
        },
      )
      .finally(() => {
        this.pending = null;
      });
    return this.pending;
  }

  reset(): void {
    this.depots.set([]);
    this.state.set('idle');
    this.error.set(null);
  }
}
