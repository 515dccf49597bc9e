import type { Routes } from '@angular/router';
import { provideEchartsCore } from 'ngx-echarts';

/** The member's own pages: the published outlook with their farm's figures. */
const myFarmRoutes: Routes = [
  {
    path: '',
    providers: [provideEchartsCore({ echarts: () => import('../shared/echarts-setup').then((m) => m.echarts) })],
    children: [
      { path: '', pathMatch: 'full', redirectTo: 'outlook' },
      { path: 'outlook', title: 'Season outlook', loadComponent: () => import('./portal-outlook').then((m) => m.PortalOutlook) },
    ],
  },
];

export default myFarmRoutes;
