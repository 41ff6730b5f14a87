import { computed, inject, type Signal } from '@angular/core';
import { hasAnyRole, type Role } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';

/** Who may change a depot's set-up and the rate plans (the API's editors); every role reads. */
export const SETUP_EDITORS: readonly Role[] = ['facilities', 'admin'];

/** True when the signed-in person may edit Depot and Rates. Call in an injection context. */
export function injectCanEditSetup(): Signal<boolean> {
  const auth = inject(AuthStore);
  return computed(() => hasAnyRole(auth.roles(), SETUP_EDITORS));
}
