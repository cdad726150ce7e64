import { Routes } from '@angular/router';
import { roleGuard } from '../../core/guards';
import { VisitSettings } from './visit-settings';

/** `/visit-settings`: a lender's per-model minimum or a hospital's sign-off threshold. */
export const visitSettingsRoutes: Routes = [
  {
    path: '',
    component: VisitSettings,
    canActivate: [roleGuard('fleet_manager', 'buyer')],
    title: 'Visit settings',
  },
];
