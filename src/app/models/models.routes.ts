import type { Routes } from '@angular/router';
import { provideCharts } from '../shared/charts';

/** The model workspace: list and define, one model with its runs, a run's result, two runs side by side. */
const modelsRoutes: Routes = [
  {
    path: '',
    // ECharts is loaded only when a chart first draws.
    providers: [provideCharts()],
    children: [
      { path: '', pathMatch: 'full', title: 'Models', loadComponent: () => import('./models-list').then((m) => m.ModelsList) },
      { path: 'compare', title: 'Compare runs', loadComponent: () => import('./run-compare').then((m) => m.RunCompare) },
      { path: 'runs/:runId', title: 'Model run', loadComponent: () => import('./run-result').then((m) => m.RunResult) },
      { path: ':id', title: 'Model', loadComponent: () => import('./model-detail').then((m) => m.ModelDetail) },
    ],
  },
];

export default modelsRoutes;
