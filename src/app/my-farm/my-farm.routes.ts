import type { Routes } from '@angular/router';
import { provideCharts } from '../shared/charts';

/** The member's own pages: the published outlook with their farm's figures. */
const myFarmRoutes: Routes = [
  {
    path: '',
    providers: [provideCharts()],
    children: [
      { path: '', pathMatch: 'full', redirectTo: 'outlook' },
      { path: 'outlook', title: 'Season outlook', loadComponent: () => import('./portal-outlook').then((m) => m.PortalOutlook) },
      { path: 'bookings', title: 'Fertiliser booking', loadComponent: () => import('./bookings/booking-page').then((m) => m.BookingPage) },
    ],
  },
];

export default myFarmRoutes;
