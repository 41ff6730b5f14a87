import type { Routes } from '@angular/router';

/** Under /rates; the parent route's role guard admits every role (editing is for facilities and admin). */
export const ratesRoutes: Routes = [
  { path: '', title: 'Rates', loadComponent: () => import('./rates-page').then((m) => m.RatesPage) },
  {
    path: 'new',
    title: 'New rate plan',
    loadComponent: () => import('./rate-plan-editor-page').then((m) => m.RatePlanEditorPage),
  },
  { path: ':id', title: 'Rate plan', loadComponent: () => import('./rate-plan-page').then((m) => m.RatePlanPage) },
  {
    path: ':id/edit',
    title: 'Edit rate plan',
    loadComponent: () => import('./rate-plan-editor-page').then((m) => m.RatePlanEditorPage),
  },
];
