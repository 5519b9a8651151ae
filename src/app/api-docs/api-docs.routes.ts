import type { Routes } from '@angular/router';

/** The API description page (lazy-loaded under /api-docs). */
export const API_DOCS_ROUTES: Routes = [
  {
    path: '',
    title: 'API · Nullsmith',
    loadComponent: () => import('./api-docs-page.component').then((m) => m.ApiDocsPageComponent),
  },
];
