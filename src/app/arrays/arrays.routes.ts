import type { Routes } from '@angular/router';

/** Pages of the arrays feature (lazy-loaded under /arrays). Add this feature's pages here. */
export const ARRAYS_ROUTES: Routes = [
  {
    path: '',
    title: 'Arrays · Nullsmith',
    loadComponent: () => import('./arrays-page.component').then((m) => m.ArraysPageComponent),
  },
];
