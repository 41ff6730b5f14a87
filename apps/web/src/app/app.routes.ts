import type { Routes } from '@angular/router';
import { homeRedirectGuard, roleGuard, signedInGuard, signedOutGuard } from './auth/auth-guards';
import { depotLinkGuard } from './depot-state/depot-link-guard';

export const routes: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in',
    canActivate: [signedOutGuard],
    loadComponent: () => import('./auth/sign-in-page').then((m) => m.SignInPage),
  },
  {
    path: 'forgot-password',
    title: 'Forgot password',
    loadComponent: () => import('./auth/forgot-password-page').then((m) => m.ForgotPasswordPage),
  },
  {
    path: 'set-password',
    title: 'Set password',
    loadComponent: () => import('./auth/set-password-page').then((m) => m.SetPasswordPage),
  },
  {
    path: '',
    canActivate: [signedInGuard],
    canActivateChild: [depotLinkGuard],
    loadComponent: () => import('./shell/shell').then((m) => m.Shell),
    children: [
      { path: '', pathMatch: 'full', canActivate: [homeRedirectGuard], children: [] },
      {
        path: 'tonight',
        title: 'Tonight',
        data: { section: 'tonight' },
        canActivate: [roleGuard],
        loadComponent: () => import('./tonight/tonight-page').then((m) => m.TonightPage),
      },
      {
        path: 'yard',
        title: 'Yard',
        data: { section: 'yard' },
        canActivate: [roleGuard],
        loadComponent: () => import('./yard/yard-page').then((m) => m.YardPage),
      },
      {
        path: 'plans',
        title: 'Plans',
        data: { section: 'plans' },
        canActivate: [roleGuard],
        loadChildren: () => import('./plans/plans.routes').then((m) => m.plansRoutes),
      },
      {
        path: 'fleet',
        title: 'Fleet',
        data: { section: 'fleet' },
        canActivate: [roleGuard],
        loadChildren: () => import('./fleet/fleet.routes').then((m) => m.fleetRoutes),
      },
      {
        path: 'depot',
        title: 'Depot',
        data: { section: 'depot' },
        canActivate: [roleGuard],
        loadComponent: () => import('./depot/depot-page').then((m) => m.DepotPage),
      },
      {
        path: 'rates',
        title: 'Rates',
        data: { section: 'rates' },
        canActivate: [roleGuard],
        loadChildren: () => import('./rates/rates.routes').then((m) => m.ratesRoutes),
      },
      {
        path: 'costs',
        title: 'Costs',
        data: { section: 'costs' },
        canActivate: [roleGuard],
        loadChildren: () => import('./costs/costs.routes').then((m) => m.costsRoutes),
      },
      {
        path: 'district',
        title: 'District',
        data: { section: 'district' },
        canActivate: [roleGuard],
        loadComponent: () => import('./district/district-page').then((m) => m.DistrictPage),
      },
      {
        path: 'people',
        data: { section: 'people' },
        canActivate: [roleGuard],
        loadChildren: () => import('./people/people.routes').then((m) => m.peopleRoutes),
      },
      {
        path: 'not-available',
        title: 'Not available for your role',
        loadComponent: () => import('./not-found/not-available-page').then((m) => m.NotAvailablePage),
      },
      {
        path: '**',
        title: 'Page not found',
        loadComponent: () => import('./not-found/not-found-page').then((m) => m.NotFoundPage),
      },
    ],
  },
];
