import type { Routes } from '@angular/router';

/** Under /people; the parent route's role guard admits administrators only. */
export const peopleRoutes: Routes = [
  { path: '', title: 'People', loadComponent: () => import('./people-page').then((m) => m.PeoplePage) },
  { path: 'outbox', title: 'Outbox', loadComponent: () => import('./outbox-page').then((m) => m.OutboxPage) },
];
