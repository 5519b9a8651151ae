import type { Routes } from '@angular/router';

/** Pages of the jobs feature (lazy-loaded under /jobs); a job's results live at /jobs/:id. */
export const JOBS_ROUTES: Routes = [
  {
    path: '',
    title: 'Jobs · Nullsmith',
    loadComponent: () => import('./jobs-page.component').then((m) => m.JobsPageComponent),
  },
  {
    path: 'new',
    title: 'New job · Nullsmith',
    loadComponent: () => import('./job-form/job-form-page.component').then((m) => m.JobFormPageComponent),
  },
  {
    path: ':id',
    title: 'Results · Nullsmith',
    loadComponent: () => import('../results/results-page.component').then((m) => m.ResultsPageComponent),
  },
];
