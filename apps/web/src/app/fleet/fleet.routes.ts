import type { Routes } from '@angular/router';
import type { ServiceDayPage } from './service-day-page';

/** Under /fleet; the parent route's role guard admits the fleet's readers. */
export const fleetRoutes: Routes = [
  { path: '', title: 'Fleet', loadComponent: () => import('./buses-page').then((m) => m.BusesPage) },
  {
    path: 'service-day',
    title: 'Service day',
    canDeactivate: [(page: ServiceDayPage) => page.canLeave()],
    loadComponent: () => import('./service-day-page').then((m) => m.ServiceDayPage),
  },
];
