import type { Routes } from '@angular/router';

/** Pages of the jobs feature (lazy-loaded under /jobs). Add this feature's pages here. */
export const JOBS_ROUTES: Routes = [
  {
    path: '',
    title: 'Jobs · Nullsmith',
    loadComponent: () => import('./jobs-page.component').then((m) => m.JobsPageComponent),
  },
];
