import type { CanDeactivateFn, Routes } from '@angular/router';
import { provideCharts } from '../shared/charts';
import { ACCESS } from '../core/access';
import { roleGuard } from '../core/auth-guards';
import type { BudgetEditor } from './budget-editor';

/** Unsaved budget edits are not lost by a stray click on the navigation. */
const leaveEditor: CanDeactivateFn<BudgetEditor> = (editor) => editor.confirmLeave();

/** Fertiliser budgets: the list, a new budget, one budget, and the products they plan with. */
const budgetRoutes: Routes = [
  {
    path: '',
    // ECharts is loaded only when the cash chart first draws.
    providers: [provideCharts()],
    children: [
      { path: '', pathMatch: 'full', title: 'Fertiliser budgets', loadComponent: () => import('./budget-list').then((m) => m.BudgetList) },
      { path: 'bookings', title: 'Member bookings', loadComponent: () => import('./member-bookings').then((m) => m.MemberBookings) },
      { path: 'products', title: 'Fertiliser products', loadComponent: () => import('./fertiliser-products').then((m) => m.FertiliserProducts) },
      {
        path: 'new',
        title: 'New fertiliser budget',
        canMatch: [roleGuard(ACCESS.budgetEdit)],
        canDeactivate: [leaveEditor],
        loadComponent: () => import('./budget-editor').then((m) => m.BudgetEditor),
      },
      { path: ':id', title: 'Fertiliser budget', canDeactivate: [leaveEditor], loadComponent: () => import('./budget-editor').then((m) => m.BudgetEditor) },
    ],
  },
];

export default budgetRoutes;
