import { computed, inject, type Signal } from '@angular/core';
import { hasAnyRole, type Role } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';

/** Who may change the fleet and the runs, and generate and publish plans (the API's editors). */
export const FLEET_EDITORS: readonly Role[] = ['supervisor', 'admin'];

/** True when the signed-in person may edit the fleet and plan. Call in an injection context. */
export function injectCanEditFleet(): Signal<boolean> {
  const auth = inject(AuthStore);
  return computed(() => hasAnyRole(auth.roles(), FLEET_EDITORS));
}
