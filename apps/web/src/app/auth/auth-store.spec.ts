import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { settle, tokenResponse } from '../testing/fixtures';
import { AuthStore } from './auth-store';

describe('AuthStore', () => {
  let store: AuthStore;
  let http: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    store = TestBed.inject(AuthStore);
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(() => http.verify());

  it('signing in keeps the user and the access token in memory', async () => {
    const signingIn = store.signIn('ada@example.org', 'correct horse battery');
    const req = http.expectOne('/api/auth/login');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({ email: 'ada@example.org', password: 'correct horse battery' });
    req.flush(tokenResponse(['supervisor']));
    const user = await signingIn;

    expect(user.name).toBe('Ada Okafor');
    expect(store.signedIn()).toBe(true);
    expect(store.user()?.roles).toEqual(['supervisor']);
    expect(store.accessToken()).toBe('token-1');
    expect(store.home().path).toBe('/plans');
    expect(store.sections().map((s) => s.label)).toContain('Plans');
  });

  it('a failed sign-in leaves nobody signed in', async () => {
    const signingIn = store.signIn('ada@example.org', 'wrong');
    http
      .expectOne('/api/auth/login')
      .flush({ error: { code: 'unauthenticated', message: 'No' } }, { status: 401, statusText: 'Unauthorized' });
    await expect(signingIn).rejects.toMatchObject({ status: 401 });
    expect(store.signedIn()).toBe(false);
  });

  it('signing out tells the server and clears the session', async () => {
    const signingIn = store.signIn('ada@example.org', 'pw');
    http.expectOne('/api/auth/login').flush(tokenResponse(['admin']));
    await signingIn;

    const signingOut = store.signOut();
    const req = http.expectOne('/api/auth/logout');
    expect(req.request.method).toBe('POST');
    req.flush(null, { status: 204, statusText: 'No Content' });
    await signingOut;

    expect(store.signedIn()).toBe(false);
    expect(store.user()).toBeNull();
    expect(store.accessToken()).toBeNull();
    expect(await store.restore()).toBe(false);
  });

  it('signing out clears the session even when the server cannot be reached', async () => {
    const signingIn = store.signIn('ada@example.org', 'pw');
    http.expectOne('/api/auth/login').flush(tokenResponse(['admin']));
    await signingIn;

    const signingOut = store.signOut();
    http.expectOne('/api/auth/logout').error(new ProgressEvent('error'));
    await signingOut;
    expect(store.signedIn()).toBe(false);
  });

  it('restores a session from the refresh cookie once, sharing one request', async () => {
    const first = store.restore();
    const second = store.restore();
    const req = http.expectOne('/api/auth/refresh');
    expect(req.request.method).toBe('POST');
    req.flush(tokenResponse(['yard'], 'token-2'));
    expect(await first).toBe(true);
    expect(await second).toBe(true);
    expect(store.accessToken()).toBe('token-2');
    expect(store.home().path).toBe('/yard');
  });

  it('a refused refresh ends with nobody signed in', async () => {
    const refreshing = store.refresh();
    http
      .expectOne('/api/auth/refresh')
      .flush(
        { error: { code: 'unauthenticated', message: 'No session' } },
        { status: 401, statusText: 'Unauthorized' },
      );
    expect(await refreshing).toBe(false);
    expect(store.signedIn()).toBe(false);
    await settle();
  });
});
