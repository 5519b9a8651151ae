import type { Routes } from '@angular/router';

/** Pages of the recordings feature (lazy-loaded under /recordings). */
export const RECORDINGS_ROUTES: Routes = [
  {
    path: '',
    title: 'Recordings · Nullsmith',
    loadComponent: () => import('./recordings-page.component').then((m) => m.RecordingsPageComponent),
  },
  {
    path: ':id',
    title: 'Recording · Nullsmith',
    loadComponent: () => import('./recording-detail-page.component').then((m) => m.RecordingDetailPageComponent),
  },
];
