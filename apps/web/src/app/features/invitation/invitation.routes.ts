import { Routes } from '@angular/router';
import { AcceptInvitation } from './accept-invitation';

/** `/accept-invitation?token=`. */
export const invitationRoutes: Routes = [
  { path: '', component: AcceptInvitation, title: 'Join your organisation' },
];
