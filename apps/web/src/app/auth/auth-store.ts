import { HttpClient } from '@angular/common/http';
import { DestroyRef, Injectable, computed, inject, signal } from '@angular/core';
import {
  homeSection,
  sectionsFor,
  type ActionTokenInfo,
  type Role,
  type SessionUser,
  type TokenResponse,
} from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';
import { Clock } from '../core/clock';

interface Session {
  accessToken: string;
  user: SessionUser;
  expiresAt: number;
}

/** Refresh this long before the access token runs out. */
const REFRESH_AHEAD_MS = 60_000;

/**
 * The signed-in person and their access token, kept in memory only. The refresh token is an
 * httpOnly cookie the browser sends to /api/auth, so a reload restores the session by refreshing.
 */
@Injectable({ providedIn: 'root' })
export class AuthStore {
  private readonly http = inject(HttpClient);
  private readonly clock = inject(Clock);
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

  constructor() {
    inject(DestroyRef).onDestroy(() => clearTimeout(this.refreshTimer));
  }

  /** Signs in; rejects with the HttpErrorResponse on failure. */
  async signIn(email: string, password: string): Promise<SessionUser> {
    const res = await firstValueFrom(
      this.http.post<TokenResponse>('/api/auth/login', { email, password }),
    );
    this.accept(res);
    return res.user;
  }

  /**
   * Trades the refresh cookie for a new access token. Concurrent callers share one request.
   * Resolves false (and clears the session) when the cookie is missing, expired or revoked.
   */
  refresh(): Promise<boolean> {
    this.refreshing ??= firstValueFrom(this.http.post<TokenResponse>('/api/auth/refresh', null))
      .then(
        (res) => {
          this.accept(res);
          return true;
        },
        () => {
          this.clear();
          return false;
        },
      )
      .finally(() => {
        this.refreshing = null;
      });
    return this.refreshing;
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
      this.restoring = Promise.resolve(false);
    }
  }

  /** Forgets the session in this tab (no request). */
  clear(): void {
    clearTimeout(this.refreshTimer);
    this.session.set(null);
  }

  requestReset(email: string): Promise<{ message: string }> {
    return firstValueFrom(this.http.post<{ message: string }>('/api/auth/forgot', { email }));
  }

  lookUpLink(token: string): Promise<ActionTokenInfo> {
    return firstValueFrom(
      this.http.get<ActionTokenInfo>(`/api/auth/action-tokens/${encodeURIComponent(token)}`),
    );
  }

  async setPassword(token: string, password: string): Promise<void> {
    await firstValueFrom(this.http.post('/api/auth/set-password', { token, password }));
  }

  private accept(res: TokenResponse): void {
    const lifetimeMs = Math.max(0, res.expiresInSeconds * 1000);
    this.session.set({ accessToken: res.accessToken, user: res.user, expiresAt: this.clock.nowMs() + lifetimeMs });
    this.restoring = Promise.resolve(true);
    clearTimeout(this.refreshTimer);
    if (lifetimeMs > 0) {
      const delay =
        lifetimeMs > 2 * REFRESH_AHEAD_MS ? lifetimeMs - REFRESH_AHEAD_MS : Math.floor(lifetimeMs * 0.75);
      this.refreshTimer = setTimeout(() => void this.refresh(), delay);
    }
  }
}
