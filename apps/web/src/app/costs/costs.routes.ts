import type { Routes } from '@angular/router';

/**
 * Under /costs; the parent route's role guard admits finance, admin, supervisors and facilities.
 * The billing period is a query parameter (`?date=2026-12-02`: the period holding that day).
 */
export const costsRoutes: Routes = [
  { path: '', title: 'Costs', loadComponent: () => import('./costs-page').then((m) => m.CostsPage) },
  {
    path: 'nights/:planId',
    title: 'Night costs',
    loadComponent: () => import('./night-costs-page').then((m) => m.NightCostsPage),
  },
];
