import { Injector, inject } from '@angular/core';
import { Router, type CanActivateChildFn } from '@angular/router';

/**
 * `?depot=<id>` in a link (from the District overview, an e-mail) opens the page on that depot:
 * before the page is made, the depot becomes the chosen one and the parameter leaves the address.
 * A depot that is not among the person's leaves the choice as it was.
 */
export const depotLinkGuard: CanActivateChildFn = async (_route, state) => {
  const router = inject(Router);
  const injector = inject(Injector);
  const tree = router.parseUrl(state.url);
  const id = tree.queryParams['depot'];
  if (typeof id !== 'string') return true;
  // Loaded here, not with the first download (the shell brings it anyway).
  const { DepotListStore } = await import('./depot-list-store');
  const depots = injector.get(DepotListStore);
  await depots.load();
  if (depots.current()?.id !== id) void depots.choose(id, { restart: false });
  delete tree.queryParams['depot'];
  return tree;
};
