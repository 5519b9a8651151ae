import type { Routes } from '@angular/router';

/** Pages of the admin feature (lazy-loaded under /admin). Add this feature's pages here. */
export const ADMIN_ROUTES: Routes = [
  {
    path: '',
    title: 'Admin · Nullsmith',
    loadComponent: () => import('./admin-page.component').then((m) => m.AdminPageComponent),
  },
  {
    path: 'settings',
    title: 'Settings · Admin · Nullsmith',
    loadComponent: () => import('./settings-page.component').then((m) => m.SettingsPageComponent),
  },
  {
    path: 'outbox',
    title: 'Outbox · Admin · Nullsmith',
    loadComponent: () => import('./outbox-page.component').then((m) => m.OutboxPageComponent),
  },
];
