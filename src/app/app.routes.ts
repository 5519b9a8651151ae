import type { Routes } from '@angular/router';
import { roleGuard, signedInGuard, signedOutGuard } from './core/role.guard';

/**
 * Top-level routes. Each feature owns its own `<feature>.routes.ts` (lazy), so adding a page
 * to a feature does not touch this file. A new feature adds one line to the shell's
 * children below and one entry in shell/nav-items.ts.
 */
export const routes: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in · Nullsmith',
    canActivate: [signedOutGuard],
    loadComponent: () => import('./sign-in/sign-in-page.component').then((m) => m.SignInPageComponent),
  },
  {
    // one-time invitation and reset links: for people who cannot sign in yet
    path: 'set-password/:secret',
    title: 'Set your password · Nullsmith',
    loadComponent: () => import('./profile/set-password-page.component').then((m) => m.SetPasswordPageComponent),
  },
  {
    path: '',
    canActivate: [signedInGuard],
    loadComponent: () => import('./shell/shell.component').then((m) => m.ShellComponent),
    children: [
      { path: '', pathMatch: 'full', redirectTo: 'jobs' },
      { path: 'recordings', loadChildren: () => import('./recordings/recordings.routes').then((m) => m.RECORDINGS_ROUTES) },
      { path: 'arrays', loadChildren: () => import('./arrays/arrays.routes').then((m) => m.ARRAYS_ROUTES) },
      { path: 'jobs', loadChildren: () => import('./jobs/jobs.routes').then((m) => m.JOBS_ROUTES) },
      {
        path: 'admin',
        canActivate: [roleGuard('admin')],
        loadChildren: () => import('./admin/admin.routes').then((m) => m.ADMIN_ROUTES),
      },
      {
        path: 'audit',
        title: 'Audit log · Nullsmith',
        canActivate: [roleGuard('operations')],
        loadComponent: () => import('./admin/audit-page.component').then((m) => m.AuditPageComponent),
      },
      { path: 'profile', loadChildren: () => import('./profile/profile.routes').then((m) => m.PROFILE_ROUTES) },
      { path: 'api-docs', loadChildren: () => import('./api-docs/api-docs.routes').then((m) => m.API_DOCS_ROUTES) },
      {
        path: '**',
        title: 'Page not found · Nullsmith',
        loadComponent: () => import('./not-found/not-found-page.component').then((m) => m.NotFoundPageComponent),
      },
    ],
  },
];
