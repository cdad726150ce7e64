import { Routes } from '@angular/router';
import { roleGuard } from '../../core/guards';
import { plannedDestinations } from '../../core/navigation';

/**
 * One "coming soon" route per planned page, guarded by the same roles as its navigation entry.
 * Only route definitions live here; the page itself loads lazily.
 */
export const placeholderRoutes: Routes = plannedDestinations.map((destination) => ({
  path: destination.path,
  title: destination.label,
  canActivate: [roleGuard(...destination.roles)],
  loadComponent: () => import('./placeholder').then((m) => m.Placeholder),
  data: { heading: destination.label, summary: destination.summary, icon: destination.icon },
}));
