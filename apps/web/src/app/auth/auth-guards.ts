import { inject } from '@angular/core';
import { RedirectCommand, Router, type CanActivateFn } from '@angular/router';
// Plain modules of the contracts, not the index: guards are in the first download (see auth-store).
import { hasAnyRole } from '@nightyard/contracts/roles';
import { SECTIONS, type SectionKey } from '@nightyard/contracts/sections';
import { AuthStore } from './auth-store';
import { landingUrl, returnUrlFrom } from './return-url';

/** Pages behind sign-in. Picks up an existing session (refresh cookie) on the first visit. */
export const signedInGuard: CanActivateFn = async (_route, state) => {
  const store = inject(AuthStore);
  const router = inject(Router);
  if (await store.restore()) return true;
  const returnUrl = returnUrlFrom(state.url);
  return router.createUrlTree(['/sign-in'], { queryParams: returnUrl ? { returnUrl } : {} });
};

/** The sign-in page sends someone who is already signed in on to where they were going. */
export const signedOutGuard: CanActivateFn = async (route) => {
  const store = inject(AuthStore);
  const router = inject(Router);
  if (!(await store.restore())) return true;
  const target = landingUrl(route.queryParamMap.get('returnUrl'), store.roles(), store.home().path);
  return router.parseUrl(target);
};

/**
 * A section opens only for the roles SECTIONS allows (route data `section`). Anyone else sees the
 * "not available for your role" page while the address bar keeps what they typed.
 */
export const roleGuard: CanActivateFn = (route) => {
  const store = inject(AuthStore);
  const router = inject(Router);
  const key = route.data['section'] as SectionKey | undefined;
  const section = SECTIONS.find((s) => s.key === key);
  if (section && hasAnyRole(store.roles(), section.roles)) return true;
  return new RedirectCommand(router.createUrlTree(['/not-available'], { queryParams: key ? { section: key } : {} }), {
    skipLocationChange: true,
  });
};

/** The bare address `/` goes to the person's home section. */
export const homeRedirectGuard: CanActivateFn = () => {
  const store = inject(AuthStore);
  return inject(Router).parseUrl(store.home().path);
};
