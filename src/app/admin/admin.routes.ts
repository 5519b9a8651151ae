import type { Routes } from '@angular/router';

/** Pages of the admin feature (lazy-loaded under /admin). Add this feature's pages here. */
export const ADMIN_ROUTES: Routes = [
  {
    path: '',
    title: 'Admin · Nullsmith',
    loadComponent: () => import('./admin-page.component').then((m) => m.AdminPageComponent),
  },
];
