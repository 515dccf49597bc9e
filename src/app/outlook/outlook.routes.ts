import type { Routes } from '@angular/router';
import { provideCharts } from '../shared/charts';
import { ACCESS } from '../core/access';
import { roleGuard } from '../core/auth-guards';

/** Season outlooks: the list, forecast against outcome, a draft, a published version, the delivery log. */
const outlookRoutes: Routes = [
  {
    path: '',
    // ECharts is loaded only when a fan chart first draws.
    providers: [provideCharts()],
    children: [
      { path: '', pathMatch: 'full', title: 'Season outlooks', loadComponent: () => import('./outlook-list').then((m) => m.OutlookList) },
      { path: 'accountability', title: 'Forecast against outcome', loadComponent: () => import('./accountability-page').then((m) => m.AccountabilityPage) },
      { path: ':id', title: 'Season outlook', loadComponent: () => import('./outlook-editor').then((m) => m.OutlookEditor) },
      { path: ':id/versions/:versionId', title: 'Published outlook', loadComponent: () => import('./version-page').then((m) => m.VersionPage) },
      {
        path: ':id/deliveries',
        title: 'Outlook e-mails',
        canMatch: [roleGuard(ACCESS.outlookLog)],
        loadComponent: () => import('./delivery-log').then((m) => m.DeliveryLogPage),
      },
    ],
  },
];

export default outlookRoutes;
