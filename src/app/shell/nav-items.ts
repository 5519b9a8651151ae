import type { Role } from '../../../shared/roles.js';

/** One entry of the side navigation. */
export interface NavItem {
  label: string;
  /** Material Symbols ligature name. */
  icon: string;
  path: string;
  /** Least role that sees the entry (the route's guard enforces the same). */
  minRole: Role;
}

/** Side navigation, in display order. A new feature adds one line here and one route. */
export const NAV_ITEMS: readonly NavItem[] = [
  { label: 'Jobs', icon: 'radar', path: '/jobs', minRole: 'analyst' },
  { label: 'Recordings', icon: 'upload_file', path: '/recordings', minRole: 'analyst' },
  { label: 'Arrays', icon: 'scatter_plot', path: '/arrays', minRole: 'analyst' },
  { label: 'Admin', icon: 'admin_panel_settings', path: '/admin', minRole: 'admin' },
  { label: 'Audit log', icon: 'fact_check', path: '/audit', minRole: 'operations' },
  { label: 'Profile', icon: 'badge', path: '/profile', minRole: 'analyst' },
  { label: 'API', icon: 'data_object', path: '/api-docs', minRole: 'analyst' },
];
