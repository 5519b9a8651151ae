import type { Routes } from '@angular/router';

/** Pages of the profile feature (lazy-loaded under /profile). */
export const PROFILE_ROUTES: Routes = [
  {
    path: '',
    title: 'Profile · Nullsmith',
    loadComponent: () => import('./profile-page.component').then((m) => m.ProfilePageComponent),
  },
];
