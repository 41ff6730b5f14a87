import { HttpClient } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import type { DepotSummary } from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';
import { toApiProblem } from '../core/api-error';

type LoadState = 'idle' | 'loading' | 'loaded' | 'failed';

/**
 * The depots the person may see (GET /api/depots: administrators every depot of the
 * organisation, everyone else the depots assigned to them), loaded once per session, and the one
 * the app works on: the depot they chose last (remembered by the API per person), else the first.
 */
@Injectable({ providedIn: 'root' })
export class DepotListStore {
  private readonly http = inject(HttpClient);

  readonly depots = signal<readonly DepotSummary[]>([]);
  readonly state = signal<LoadState>('idle');
  readonly error = signal<string | null>(null);
  /** The depot chosen (the API's remembered choice, or one just made here). */
  private readonly chosenId = signal<string | null>(null);
  /** The depot the app works on: the chosen one while it is in the list, else the first. */
  readonly current = computed<DepotSummary | null>(() => {
    const list = this.depots();
    const id = this.chosenId();
    return list.find((d) => d.id === id) ?? list[0] ?? null;
  });
  /** Counts the switches made with `choose` (the shell starts the page afresh on each). */
  readonly switches = signal(0);
  /** Why the last choice could not be remembered (the app went back to the depot before it). */
  readonly choiceProblem = signal<string | null>(null);

  private pending: Promise<void> | null = null;
  /** Counts the choices made here: a list or a failure older than the last choice leaves it alone. */
  private choices = 0;

  /** Loads unless already loaded or loading; `force` reloads. */
  load(force = false): Promise<void> {
    if (!force && (this.state() === 'loaded' || this.pending)) return this.pending ?? Promise.resolve();
    this.state.set('loading');
    this.error.set(null);
    const choicesAtStart = this.choices;
    this.pending = firstValueFrom(
      this.http.get<{ depots: DepotSummary[]; chosenDepotId?: string | null }>('/api/depots'),
    )
      .then(
        (res) => {
          this.depots.set(res.depots);
          // A choice made while the list was on its way stands over the remembered one.
          if (this.choices === choicesAtStart) this.chosenId.set(res.chosenDepotId ?? null);
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

  /**
   * Fetches the list again without going back to "loading" (the cards stay on screen): the
   * counts change during a night (a bus reported absent, a charger out). A failure keeps the list
   * as it was; the next refresh or load tries again.
   */
  async refresh(): Promise<void> {
    if (this.state() !== 'loaded') return this.load();
    const choicesAtStart = this.choices;
    try {
      const res = await firstValueFrom(this.http.get<{ depots: DepotSummary[] }>('/api/depots'));
      if (this.choices === choicesAtStart) this.depots.set(res.depots);
    } catch {
      // The list shown stays; Tonight's own figures say whether the depot answers.
    }
  }

  /**
   * Works on depot `id` from now on (at once) and has the API remember it (PUT /api/me/depot).
   * Should the API refuse, the app goes back to the depot before and `choiceProblem` says why.
   * Resolves true when the choice was remembered. `restart: false` when a navigation to another
   * page follows at once (a link): the page shown then is made for the new depot anyway.
   */
  async choose(id: string, { restart = true } = {}): Promise<boolean> {
    const before = this.current();
    if (!this.depots().some((d) => d.id === id)) return false;
    this.choiceProblem.set(null);
    if (before?.id === id) return true;
    this.chosenId.set(id);
    if (restart) this.switches.update((n) => n + 1);
    const mine = ++this.choices;
    try {
      await firstValueFrom(this.http.put<{ chosenDepotId: string }>('/api/me/depot', { depotId: id }));
      return true;
    } catch (err) {
      // A later choice has taken over meanwhile: it stands, whatever became of this one.
      if (mine === this.choices && before) {
        this.chosenId.set(before.id);
        this.switches.update((n) => n + 1);
        const name = this.depots().find((d) => d.id === id)?.name ?? 'that depot';
        this.choiceProblem.set(`Could not switch to ${name}. ${toApiProblem(err).message}`);
      }
      return false;
    }
  }

  reset(): void {
    this.depots.set([]);
    this.chosenId.set(null);
    this.state.set('idle');
    this.error.set(null);
    this.choiceProblem.set(null);
  }
}
