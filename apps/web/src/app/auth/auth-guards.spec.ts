import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import {
  RedirectCommand,
  Router,
  UrlTree,
  provideRouter,
  type ActivatedRouteSnapshot,
  type RouterStateSnapshot,
} from '@angular/router';
import type { Role, SectionKey } from '@nightyard/contracts';
import { tokenResponse } from '../testing/fixtures';
import { roleGuard, signedInGuard } from './auth-guards';
import { AuthStore } from './auth-store';

function routeFor(section: SectionKey): ActivatedRouteSnapshot {
  return { data: { section } } as unknown as ActivatedRouteSnapshot;
}

describe('route guards', () => {
  let mock: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    mock = TestBed.inject(HttpTestingController);
  });

  async function signInAs(roles: Role[]): Promise<void> {
    const store = TestBed.inject(AuthStore);
    const p = store.signIn('x@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
    await p;
  }

  function runRoleGuard(section: SectionKey) {
    return TestBed.runInInjectionContext(() => roleGuard(routeFor(section), {} as RouterStateSnapshot));
  }

  it('yard staff cannot open People: they get the "not available" page, address unchanged', async () => {
    await signInAs(['yard']);
    const result = runRoleGuard('people');
    expect(result).toBeInstanceOf(RedirectCommand);
    const command = result as RedirectCommand;
    expect(command.navigationBehaviorOptions?.skipLocationChange).toBe(true);
    expect(TestBed.inject(Router).serializeUrl(command.redirectTo)).toBe('/not-available?section=people');
  });

  it('yard staff can open Yard, Tonight, Depot and Rates but not Plans or Costs', async () => {
    await signInAs(['yard']);
    for (const open of ['yard', 'tonight', 'depot', 'rates'] as const) expect(runRoleGuard(open)).toBe(true);
    for (const closed of ['plans', 'costs', 'fleet'] as const)
      expect(runRoleGuard(closed)).toBeInstanceOf(RedirectCommand);
  });

  it('an administrator can open People', async () => {
    await signInAs(['admin']);
    expect(runRoleGuard('people')).toBe(true);
  });

  it('someone with several roles gets every section of each', async () => {
    await signInAs(['yard', 'finance']);
    expect(runRoleGuard('costs')).toBe(true);
    expect(runRoleGuard('yard')).toBe(true);
  });

  it('sends a visitor without a session to sign in, remembering where they were going', async () => {
    const result = TestBed.runInInjectionContext(() =>
      signedInGuard({} as ActivatedRouteSnapshot, { url: '/people/outbox' } as RouterStateSnapshot),
    ) as Promise<UrlTree>;
    mock
      .expectOne('/api/auth/refresh')
      .flush({ error: { code: 'unauthenticated', message: 'No' } }, { status: 401, statusText: 'Unauthorized' });
    const tree = await result;
    expect(TestBed.inject(Router).serializeUrl(tree)).toBe('/sign-in?returnUrl=%2Fpeople%2Foutbox');
  });

  it('takes a quiet 204 (no refresh cookie) as nobody signed in', async () => {
    const result = TestBed.runInInjectionContext(() =>
      signedInGuard({} as ActivatedRouteSnapshot, { url: '/tonight' } as RouterStateSnapshot),
    ) as Promise<UrlTree>;
    mock.expectOne('/api/auth/refresh').flush(null, { status: 204, statusText: 'No Content' });
    const tree = await result;
    expect(TestBed.inject(Router).serializeUrl(tree)).toBe('/sign-in?returnUrl=%2Ftonight');
  });

  it('lets a visitor in when the refresh cookie still holds a session', async () => {
    const result = TestBed.runInInjectionContext(() =>
      signedInGuard({} as ActivatedRouteSnapshot, { url: '/tonight' } as RouterStateSnapshot),
    );
    mock.expectOne('/api/auth/refresh').flush(tokenResponse(['admin']));
    expect(await result).toBe(true);
  });
});
