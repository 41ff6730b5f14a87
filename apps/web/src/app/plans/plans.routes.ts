import { inject } from '@angular/core';
import { Router, type Routes } from '@angular/router';

/**
 * Under /plans; the parent route's role guard admits the plan readers. The night and the version
 * are query parameters (`?date=2026-12-03&plan=<id>`); `/plans/<id>` (the link in the publish
 * e-mail) opens that version.
 */
export const plansRoutes: Routes = [
  { path: '', title: 'Plans', loadComponent: () => import('./plans-page').then((m) => m.PlansPage) },
  {
    path: ':planId',
    redirectTo: ({ params }) => inject(Router).createUrlTree(['/plans'], { queryParams: { plan: params['planId'] } }),
  },
];
