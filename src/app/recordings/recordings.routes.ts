import type { Routes } from '@angular/router';

/** Pages of the recordings feature (lazy-loaded under /recordings). Add this feature's pages here. */
export const RECORDINGS_ROUTES: Routes = [
  {
    path: '',
    title: 'Recordings · Nullsmith',
    loadComponent: () => import('./recordings-page.component').then((m) => m.RecordingsPageComponent),
  },
];
