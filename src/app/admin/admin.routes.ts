import { inject } from '@angular/core';
import type { Routes } from '@angular/router';
import { ACCESS } from '../core/access';
import { roleGuard } from '../core/auth-guards';
import { devServiceGuard } from './dev-service-guard';
import { DevMailApi } from './mail/dev-mail-api';
import { DevPaymentsApi } from './payments/dev-payments-api';

const adminRoutes: Routes = [
  { path: '', pathMatch: 'full', redirectTo: '/' },
  {
    path: 'users',
    title: 'Users',
    canMatch: [roleGuard(ACCESS.users)],
    loadComponent: () => import('./users/users').then((m) => m.Users),
  },
  {
    path: 'settings',
    title: 'Co-op settings',
    canMatch: [roleGuard(ACCESS.settings)],
    loadComponent: () => import('./settings/coop-settings').then((m) => m.CoopSettingsPage),
  },
  {
    path: 'audit',
    title: 'Audit log',
    canMatch: [roleGuard(ACCESS.audit)],
    loadComponent: () => import('./audit/audit-log').then((m) => m.AuditLog),
  },
  {
    path: 'mail',
    title: 'Mail outbox',
    canMatch: [roleGuard(ACCESS.devMail), devServiceGuard(() => inject(DevMailApi).status())],
    loadComponent: () => import('./mail/dev-mail').then((m) => m.DevMail),
  },
  {
    path: 'payments',
    title: 'Test payments',
    canMatch: [roleGuard(ACCESS.devPayments), devServiceGuard(() => inject(DevPaymentsApi).status())],
    loadComponent: () => import('./payments/dev-payments').then((m) => m.DevPayments),
  },
];

export default adminRoutes;
