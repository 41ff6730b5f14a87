import { HttpClient, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { settle, tokenResponse } from '../testing/fixtures';
import { authInterceptor } from './auth-interceptor';
import { AuthStore } from './auth-store';

const UNAUTHORIZED = { status: 401, statusText: 'Unauthorized' };
const UNAUTH_BODY = { error: { code: 'unauthenticated', message: 'Sign in again' } };

describe('authInterceptor', () => {
  let http: HttpClient;
  let mock: HttpTestingController;
  let store: AuthStore;
  let router: Router;

  async function signIn(token = 'token-1'): Promise<void> {
    const p = store.signIn('ada@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(['admin'], token));
    await p;
  }

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([authInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    http = TestBed.inject(HttpClient);
    mock = TestBed.inject(HttpTestingController);
    store = TestBed.inject(AuthStore);
    router = TestBed.inject(Router);
  });

  afterEach(() => mock.verify());

  it('adds the bearer token to API calls', async () => {
    await signIn('abc');
    const done = firstValueFrom(http.get('/api/depots'));
    const req = mock.expectOne('/api/depots');
    expect(req.request.headers.get('Authorization')).toBe('Bearer abc');
    req.flush({ depots: [] });
    await done;
  });

  it('sends no bearer to the sign-in call or to other sites', async () => {
    await signIn('abc');
    void firstValueFrom(http.post('/api/auth/forgot', { email: 'a@b.org' }));
    expect(mock.expectOne('/api/auth/forgot').request.headers.has('Authorization')).toBe(false);
    void firstValueFrom(http.get('https://example.org/x'));
    expect(mock.expectOne('https://example.org/x').request.headers.has('Authorization')).toBe(false);
  });

  it('on a 401 refreshes once and retries with the new token', async () => {
    await signIn('old');
    const result = firstValueFrom(http.get<{ users: unknown[] }>('/api/users'));

    const first = mock.expectOne('/api/users');
    expect(first.request.headers.get('Authorization')).toBe('Bearer old');
    first.flush(UNAUTH_BODY, UNAUTHORIZED);

    mock.expectOne('/api/auth/refresh').flush(tokenResponse(['admin'], 'new'));
    await settle();

    const retry = mock.expectOne('/api/users');
    expect(retry.request.headers.get('Authorization')).toBe('Bearer new');
    retry.flush({ users: [] });
    expect(await result).toEqual({ users: [] });
  });

  it('when the refresh fails too, gives up and sends the person to sign in', async () => {
    await signIn('old');
    await router.navigateByUrl('/');
    const navigate = vi.spyOn(router, 'navigate').mockResolvedValue(true);
    const result = firstValueFrom(http.get('/api/users'));

    mock.expectOne('/api/users').flush(UNAUTH_BODY, UNAUTHORIZED);
    mock.expectOne('/api/auth/refresh').flush(UNAUTH_BODY, UNAUTHORIZED);

    await expect(result).rejects.toMatchObject({ status: 401 });
    mock.expectNone('/api/users');
    expect(store.signedIn()).toBe(false);
    expect(navigate).toHaveBeenCalledWith(['/sign-in'], { queryParams: {} });
  });

  it('does not retry a second time when the retried call is refused as well', async () => {
    await signIn('old');
    const result = firstValueFrom(http.get('/api/users'));
    mock.expectOne('/api/users').flush(UNAUTH_BODY, UNAUTHORIZED);
    mock.expectOne('/api/auth/refresh').flush(tokenResponse(['admin'], 'new'));
    await settle();
    mock.expectOne('/api/users').flush(UNAUTH_BODY, UNAUTHORIZED);
    await expect(result).rejects.toMatchObject({ status: 401 });
    mock.expectNone('/api/auth/refresh');
  });

  it('passes other errors through untouched', async () => {
    await signIn();
    const result = firstValueFrom(http.get('/api/users'));
    mock
      .expectOne('/api/users')
      .flush({ error: { code: 'forbidden', message: 'No' } }, { status: 403, statusText: 'Forbidden' });
    await expect(result).rejects.toMatchObject({ status: 403 });
    mock.expectNone('/api/auth/refresh');
  });
});
