import { computed, inject, type Signal } from '@angular/core';
import { FLEET_EDITORS, SETUP_EDITORS, hasAnyRole, type Role } from '@nightyard/contracts/roles';
import { AuthStore } from './auth-store';

// Role checks for what a page shows: the same named lists the API's routes declare
// (libs/contracts/src/roles.ts). Call them in an injection context.

/** True while the signed-in person holds one of `allowed`. */
export function injectHasAnyRole(allowed: readonly Role[]): Signal<boolean> {
  const auth = inject(AuthStore);
  return computed(() => hasAnyRole(auth.roles(), allowed));
}

/** May edit Depot and Rates (SETUP_EDITORS); every role reads them. */
export function injectCanEditSetup(): Signal<boolean> {
  return injectHasAnyRole(SETUP_EDITORS);
}

/** May edit the fleet and the runs (FLEET_EDITORS). */
export function injectCanEditFleet(): Signal<boolean> {
  return injectHasAnyRole(FLEET_EDITORS);
}
