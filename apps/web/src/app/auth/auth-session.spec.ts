import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import type { TokenResponse } from '@nightyard/contracts';
import { Clock } from '../core/clock';
import { sessionUser, settle } from '../testing/fixtures';
import { AuthStore, REFRESH_AHEAD_MS, tokenExpiry } from './auth-store';
import { AuthTabs, type TabMessage } from './auth-tabs';

/** An unsigned JWT-shaped token with `exp` (seconds): only its payload is read by the client. */
function jwtExpiringAt(ms: number, name = 'x'): string {
  const b64 = (o: object) => btoa(JSON.stringify(o)).replace(/=+$/, '').replace(/\+/g, '-').replace(/\//g, '_');
  return `${b64({ alg: 'HS256' })}.${b64({ sub: name, exp: Math.floor(ms / 1000) })}.sig`;
}

/** Two "tabs" in one test: messages told by one reach the others' listeners, never its own. */
class FakeTabs {
  static all: FakeTabs[] = [];
  readonly told: TabMessage[] = [];
  private listener: ((m: TabMessage) => void) | null = null;
  constructor() {
    FakeTabs.all.push(this);
  }
  exclusive<T>(work: () => Promise<T>): Promise<T> {
    return work();
  }
  tell(m: TabMessage): void {
    this.told.push(m);
    for (const t of FakeTabs.all) if (t !== this) t.listener?.(m);
  }
  listen(l: (m: TabMessage) => void): () => void {
    this.listener = l;
    return () => (this.listener = null);
  }
}

// The server's clock in these tests: 2026-12-09 23:00 at the depot (UTC-6), whatever the machine says.
const SERVER_NOW = Date.parse('2026-12-09T23:00:00-06:00');

describe('AuthStore sessions', () => {
  let store: AuthStore;
  let http: HttpTestingController;
  let tabs: FakeTabs;
  let clock: Clock;

  function tokens(expMs: number, name = 'x'): TokenResponse {
    return { accessToken: jwtExpiringAt(expMs, name), expiresInSeconds: 900, user: sessionUser(['yard']) };
  }

  beforeEach(() => {
    vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout', 'setInterval', 'clearInterval', 'Date'] });
    vi.setSystemTime(new Date('2026-03-01T09:00:00Z')); // the device's own (wrong) clock
    FakeTabs.all = [];
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: AuthTabs, useClass: FakeTabs },
      ],
    });
    clock = TestBed.inject(Clock);
    clock.setServerTime(SERVER_NOW);
    store = TestBed.inject(AuthStore);
    http = TestBed.inject(HttpTestingController);
    tabs = TestBed.inject(AuthTabs) as unknown as FakeTabs;
  });

  afterEach(() => {
    http.verify();
    vi.useRealTimers();
  });

  async function signIn(res: TokenResponse): Promise<void> {
    const p = store.signIn('ada@example.org', 'pw');
    http.expectOne('/api/auth/login').flush(res);
    await p;
  }

  it('reads the expiry from the token itself', () => {
    expect(tokenExpiry(jwtExpiringAt(SERVER_NOW + 900_000))).toBe(SERVER_NOW + 900_000);
    expect(tokenExpiry('not-a-jwt')).toBeNull();
  });

  it('refreshes quietly about a minute before the token runs out, counted on the server clock', async () => {
    await signIn(tokens(SERVER_NOW + 15 * 60_000));
    // 13 minutes on: nothing yet (the device's clock is months off; the app's Clock is not).
    await vi.advanceTimersByTimeAsync(13 * 60_000);
    http.expectNone('/api/auth/refresh');
    // Before the last minute (a few seconds of spread per tab), the refresh goes out.
    await vi.advanceTimersByTimeAsync(15 * 60_000 - 13 * 60_000 - REFRESH_AHEAD_MS + 1);
    const req = http.expectOne('/api/auth/refresh');
    req.flush(tokens(SERVER_NOW + 30 * 60_000, 'second'));
    await settle();
    expect(store.accessToken()).toBe(jwtExpiringAt(SERVER_NOW + 30 * 60_000, 'second'));
    // The other tabs are handed the new token.
    expect(tabs.told.at(-1)).toMatchObject({ kind: 'tokens' });
  });

  it('when the server clock jumps past the expiry, the next check refreshes at once', async () => {
    await signIn(tokens(SERVER_NOW + 15 * 60_000));
    clock.setServerTime(SERVER_NOW + 20 * 60_000);
    await vi.advanceTimersByTimeAsync(15_000);
    http.expectOne('/api/auth/refresh').flush(tokens(SERVER_NOW + 35 * 60_000));
    await settle();
    expect(store.signedIn()).toBe(true);
  });

  it('a token from another tab resets the timer: this tab does not refresh as well', async () => {
    await signIn(tokens(SERVER_NOW + 15 * 60_000));
    const other = new FakeTabs();
    await vi.advanceTimersByTimeAsync(13 * 60_000);
    other.tell({ kind: 'tokens', tokens: tokens(SERVER_NOW + 28 * 60_000, 'from-other-tab') });
    await vi.advanceTimersByTimeAsync(2 * 60_000);
    http.expectNone('/api/auth/refresh');
    expect(store.accessToken()).toBe(jwtExpiringAt(SERVER_NOW + 28 * 60_000, 'from-other-tab'));
  });

  it("a refresh that waited while another tab refreshed takes that tab's token, no request", async () => {
    await signIn(tokens(SERVER_NOW + 15 * 60_000));
    let release!: () => void;
    const held = new Promise<void>((r) => (release = r));
    vi.spyOn(tabs, 'exclusive').mockImplementation(async <T>(work: () => Promise<T>) => {
      await held;
      return work();
    });
    const refreshing = store.refresh();
    new FakeTabs().tell({ kind: 'tokens', tokens: tokens(SERVER_NOW + 30 * 60_000, 'shared') });
    release();
    expect(await refreshing).toBe(true);
    http.expectNone('/api/auth/refresh');
    expect(store.accessToken()).toBe(jwtExpiringAt(SERVER_NOW + 30 * 60_000, 'shared'));
  });

  it('freshToken hands out the current token, or refreshes first when it is about to run out', async () => {
    await signIn(tokens(SERVER_NOW + 15 * 60_000, 'first'));
    expect(await store.freshToken()).toBe(jwtExpiringAt(SERVER_NOW + 15 * 60_000, 'first'));
    clock.setServerTime(SERVER_NOW + 14.5 * 60_000);
    const fresh = store.freshToken();
    await settle();
    http.expectOne('/api/auth/refresh').flush(tokens(SERVER_NOW + 30 * 60_000, 'next'));
    expect(await fresh).toBe(jwtExpiringAt(SERVER_NOW + 30 * 60_000, 'next'));
  });

  it('a session that really ended goes to sign-in with the return URL; guards then find nobody signed in', async () => {
    await signIn(tokens(SERVER_NOW + 15 * 60_000));
    const router = TestBed.inject(Router);
    vi.spyOn(router, 'url', 'get').mockReturnValue('/depot?tab=settings');
    const navigate = vi.spyOn(router, 'navigate').mockResolvedValue(true);
    await vi.advanceTimersByTimeAsync(14 * 60_000);
    http
      .expectOne('/api/auth/refresh')
      .flush({ error: { code: 'unauthenticated', message: 'Ended' } }, { status: 401, statusText: 'Unauthorized' });
    await settle();
    expect(store.signedIn()).toBe(false);
    expect(navigate).toHaveBeenCalledWith(['/sign-in'], { queryParams: { returnUrl: '/depot?tab=settings' } });
    // The restore promise no longer says "signed in" (the old dead end: back to the page, menu empty).
    expect(await store.restore()).toBe(false);
  });

  it('signing out in another tab ends the session here too', async () => {
    await signIn(tokens(SERVER_NOW + 15 * 60_000));
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    new FakeTabs().tell({ kind: 'signed-out' });
    expect(store.signedIn()).toBe(false);
    expect(navigate).toHaveBeenCalledWith(['/sign-in'], { queryParams: {} });
  });
});
