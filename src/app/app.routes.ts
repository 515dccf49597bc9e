import type { Routes } from '@angular/router';
import { ACCESS } from './core/access';
import { roleGuard, signedInGuard, signedOutGuard } from './core/auth-guards';
import { Shell } from './shell/shell';

export const routes: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in',
    canMatch: [signedOutGuard],
    loadComponent: () => import('./sign-in/sign-in').then((m) => m.SignIn),
  },
  {
    path: 'forgot-password',
    title: 'Forgot your password',
    loadComponent: () => import('./sign-in/forgot-password').then((m) => m.ForgotPassword),
  },
  {
    path: 'invite/:token',
    title: 'Accept your invitation',
    data: { purpose: 'invite' },
    loadComponent: () => import('./set-password/set-password').then((m) => m.SetPassword),
  },
  {
    path: 'reset/:token',
    title: 'Choose a new password',
    data: { purpose: 'reset' },
    loadComponent: () => import('./set-password/set-password').then((m) => m.SetPassword),
  },
  {
    path: '',
    component: Shell,
    canMatch: [signedInGuard],
    children: [
      { path: '', pathMatch: 'full', title: 'Home', loadComponent: () => import('./home/home').then((m) => m.Home) },
      {
        path: 'farms',
        title: 'Farms',
        canMatch: [roleGuard(ACCESS.farms)],
        loadComponent: () => import('./farms/farms-list').then((m) => m.FarmsList),
      },
      {
        path: 'farms/:id',
        title: 'Farm records',
        canMatch: [roleGuard(ACCESS.farms)],
        loadComponent: () => import('./farms/farm-records').then((m) => m.FarmRecords),
      },
      {
        path: 'prices',
        title: 'Prices',
        canMatch: [roleGuard(ACCESS.prices)],
        loadComponent: () => import('./data-desk/prices/prices-page').then((m) => m.PricesPage),
      },
      {
        path: 'imports',
        title: 'Imports',
        canMatch: [roleGuard(ACCESS.imports)],
        loadComponent: () => import('./data-desk/imports/imports-page').then((m) => m.ImportsPage),
      },
      {
        path: 'contracts',
        title: 'Delivery contracts',
        canMatch: [roleGuard(ACCESS.contracts)],
        loadComponent: () => import('./contracts/contracts-page').then((m) => m.ContractsPage),
      },
      {
        path: 'reference',
        title: 'Reference data',
        canMatch: [roleGuard(ACCESS.reference)],
        loadComponent: () => import('./data-desk/reference/reference-page').then((m) => m.ReferencePage),
      },
      { path: 'models', canMatch: [roleGuard(ACCESS.models)], loadChildren: () => import('./models/models.routes') },
      { path: 'outlook', canMatch: [roleGuard(ACCESS.outlook)], loadChildren: () => import('./outlook/outlook.routes') },
      { path: 'my-farm', canMatch: [roleGuard(ACCESS.myFarm)], loadChildren: () => import('./my-farm/my-farm.routes') },
      { path: 'budget', canMatch: [roleGuard(ACCESS.budget)], loadChildren: () => import('./budget/budget.routes') },
      { path: 'admin', loadChildren: () => import('./admin/admin.routes') },
      { path: 'account', title: 'Account', loadComponent: () => import('./account/account').then((m) => m.Account) },
      { path: 'forbidden', title: 'No access', loadComponent: () => import('./status/forbidden').then((m) => m.Forbidden) },
      { path: '**', title: 'Page not found', loadComponent: () => import('./status/not-found').then((m) => m.NotFound) },
    ],
  },
];
