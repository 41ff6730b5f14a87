import { HttpClient } from '@angular/common/http';
import { DOCUMENT, DestroyRef, Injectable, Injector, computed, inject, signal } from '@angular/core';
import { Router } from '@angular/router';
// The first download holds this store: plain modules of the contracts only, never the index (it
// brings zod and every schema, which only the sections need).
import type { ActionTokenInfo, Role, SessionUser, TokenResponse } from '@nightyard/contracts';
import { homeSection, sectionsFor } from '@nightyard/contracts/sections';
import { firstValueFrom } from 'rxjs';
import { Clock } from '../core/clock';
import { SessionEnd } from '../core/session-end';
import { AuthTabs } from './auth-tabs';
import { returnUrlFrom } from './return-url';

interface Session {
  accessToken: string;
  user: SessionUser;
  /** When the access token runs out, on the server's clock (ms since the epoch). */
  expiresAt: number;
  /** When to renew it: counted once, when the token arrives. */
  refreshAt: number;
}

/** Refresh this long before the access token runs out. */
export const REFRESH_AHEAD_MS = 60_000;
/** How often the expiry is checked besides the timer. */
const WATCH_MS = 15_000;
/** Tabs spread their refreshes over this much, so one tab's new token reaches the others first. */
const SPREAD_MS = 5_000;

/** The `exp` of a JWT (ms since the epoch), or null when the token is not one. */
export function tokenExpiry(token: string): number | null {
  try {
    const part = token.split('.')[1];
    if (!part) return null;
    const payload = JSON.parse(atob(part.replace(/-/g, '+').replace(/_/g, '/'))) as { exp?: unknown };
    return typeof payload.exp === 'number' ? payload.exp * 1000 : null;
  } catch {
    return null;
  }
}

/**
 * The signed-in person and their access token, kept in memory only. The refresh token is an
 * httpOnly cookie the browser sends to /api/auth, so a reload restores the session by refreshing.
 * The access token is renewed quietly before it runs out (counted on the app's Clock, which
 * follows the server); the tabs of one browser renew it once between them (AuthTabs).
 */
@Injectable({ providedIn: 'root' })
export class AuthStore {
  private readonly http = inject(HttpClient);
  private readonly clock = inject(Clock);
  private readonly tabs = inject(AuthTabs);
  private readonly injector = inject(Injector);
  private readonly session = signal<Session | null>(null);

  readonly user = computed(() => this.session()?.user ?? null);
  readonly accessToken = computed(() => this.session()?.accessToken ?? null);
  readonly signedIn = computed(() => this.session() !== null);
  readonly roles = computed<readonly Role[]>(() => this.user()?.roles ?? []);
  readonly sections = computed(() => sectionsFor(this.roles()));
  readonly home = computed(() => homeSection(this.roles()));

  private refreshing: Promise<boolean> | null = null;
  private restoring: Promise<boolean> | null = null;
  private refreshTimer: ReturnType<typeof setTimeout> | undefined;
  /** Counts the sessions taken (here or from another tab), to notice one that came meanwhile. */
  private generation = 0;
  private readonly spread = Math.floor(Math.random() * SPREAD_MS);

  constructor() {
    const stopListening = this.tabs.listen((m) => {
      if (m.kind === 'tokens') this.accept(m.tokens);
      else if (this.signedIn()) this.endSession();
    });
    // A watch besides the timer: the server's clock may jump (a test standing the API elsewhere)
    // and a sleeping device's timer runs late; either way the token's expiry is counted again.
    const watch = setInterval(() => this.refreshIfDue(), WATCH_MS);
    const view = inject(DOCUMENT).defaultView;
    const onVisible = () => this.refreshIfDue();
    view?.addEventListener('visibilitychange', onVisible);
    inject(DestroyRef).onDestroy(() => {
      clearTimeout(this.refreshTimer);
      clearInterval(watch);
      stopListening();
      view?.removeEventListener('visibilitychange', onVisible);
    });
  }

  /** Signs in; rejects with the HttpErrorResponse on failure. */
  async signIn(email: string, password: string): Promise<SessionUser> {
    const res = await firstValueFrom(this.http.post<TokenResponse>('/api/auth/login', { email, password }));
    this.accept(res);
    this.tabs.tell({ kind: 'tokens', tokens: res });
    return res.user;
  }

  /**
   * Trades the refresh cookie for a new access token. Concurrent callers share one request, and
   * so do the browser's tabs: a tab that finds another has refreshed meanwhile takes its token.
   * Resolves false (and clears the session) when the cookie is missing, expired or revoked.
   */
  refresh(): Promise<boolean> {
    const seen = this.generation;
    this.refreshing ??= this.tabs
      .exclusive(async () => {
        if (this.generation !== seen && this.signedIn()) return true;
        try {
          // 204 (no body): there is no refresh cookie, so no session to restore.
          const res = await firstValueFrom(this.http.post<TokenResponse | null>('/api/auth/refresh', null));
          if (!res) {
            this.clear();
            return false;
          }
          this.accept(res);
          this.tabs.tell({ kind: 'tokens', tokens: res });
          return true;
        } catch {
          this.clear();
          return false;
        }
      })
      .finally(() => {
        this.refreshing = null;
      });
    return this.refreshing;
  }

  /**
   * An access token good for a while yet (refreshed first when it is about to run out), or null
   * when there is no session. For callers that use the token themselves (a stream, a download).
   */
  async freshToken(): Promise<string | null> {
    if (this.session() && !this.due()) return this.accessToken();
    if (!this.session() && !(await this.restore())) return null;
    if (this.due() && !(await this.refresh())) return null;
    return this.accessToken();
  }

  /** On the first guarded navigation: is there a session to pick up again? Tries once. */
  restore(): Promise<boolean> {
    if (this.signedIn()) return Promise.resolve(true);
    this.restoring ??= this.refresh();
    return this.restoring;
  }

  async signOut(): Promise<void> {
    try {
      await firstValueFrom(this.http.post('/api/auth/logout', null));
    } catch {
      // Signed out locally either way; the cookie expires on its own.
    } finally {
      this.clear();
      this.tabs.tell({ kind: 'signed-out' });
    }
  }

  /**
   * The session has really ended (the refresh cookie is refused, or another tab signed out): keeps
   * the unsaved input of the forms on screen and goes to sign-in, to come back here afterwards.
   */
  endSession(): void {
    this.clear();
    const router = this.injector.get(Router);
    this.injector.get(SessionEnd).notify();
    const returnUrl = returnUrlFrom(router.url);
    if (router.url.startsWith('/sign-in')) return;
    void router.navigate(['/sign-in'], { queryParams: returnUrl ? { returnUrl } : {} });
  }

  /** Forgets the session in this tab (no request); a guard then finds nobody signed in. */
  clear(): void {
    clearTimeout(this.refreshTimer);
    this.session.set(null);
    this.restoring = Promise.resolve(false);
  }

  requestReset(email: string): Promise<{ message: string }> {
    return firstValueFrom(this.http.post<{ message: string }>('/api/auth/forgot', { email }));
  }

  lookUpLink(token: string): Promise<ActionTokenInfo> {
    return firstValueFrom(this.http.get<ActionTokenInfo>(`/api/auth/action-tokens/${encodeURIComponent(token)}`));
  }

  async setPassword(token: string, password: string): Promise<void> {
    await firstValueFrom(this.http.post('/api/auth/set-password', { token, password }));
  }

  private accept(res: TokenResponse): void {
    // The token's own expiry, on the server's clock; the lifetime it came with where it has none.
    const expiresAt = tokenExpiry(res.accessToken) ?? this.clock.nowMs() + Math.max(0, res.expiresInSeconds * 1000);
    this.session.set({ accessToken: res.accessToken, user: res.user, expiresAt, refreshAt: this.refreshAt(expiresAt) });
    this.generation++;
    this.restoring = Promise.resolve(true);
    this.schedule();
  }

  /** When to refresh: a minute ahead (a quarter of the life left, if that is shorter), spread per tab. */
  private refreshAt(expiresAt: number): number {
    const life = expiresAt - this.clock.nowMs();
    const ahead = life > 2 * REFRESH_AHEAD_MS ? REFRESH_AHEAD_MS + this.spread : Math.ceil(life * 0.25);
    return expiresAt - ahead;
  }

  private due(): boolean {
    const s = this.session();
    return !!s && this.clock.nowMs() >= s.expiresAt - REFRESH_AHEAD_MS;
  }

  private schedule(): void {
    clearTimeout(this.refreshTimer);
    const s = this.session();
    if (!s) return;
    const delay = Math.max(0, s.refreshAt - this.clock.nowMs());
    this.refreshTimer = setTimeout(() => this.refreshIfDue(), delay);
  }

  /** The timer's (or a wake-up's) turn: refreshes unless another tab already did; ends a lost session. */
  private refreshIfDue(): void {
    const s = this.session();
    if (!s) return;
    if (this.clock.nowMs() < s.refreshAt) {
      this.schedule();
      return;
    }
    void this.refresh().then((ok) => {
      if (!ok) this.endSession();
    });
  }
}
