import type { Routes } from '@angular/router';
import { ACCESS } from '../core/access';
import { roleGuard } from '../core/auth-guards';
import { devMailGuard } from './mail/dev-mail-guard';
import { devPaymentsGuard } from './payments/dev-payments-guard';

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
    canMatch: [roleGuard(ACCESS.devMail), devMailGuard],
    loadComponent: () => import('./mail/dev-mail').then((m) => m.DevMail),
  },
  {
    path: 'payments',
    title: 'Test payments',
    canMatch: [roleGuard(ACCESS.devPayments), devPaymentsGuard],
    loadComponent: () => import('./payments/dev-payments').then((m) => m.DevPayments),
  },
];

export default adminRoutes;
