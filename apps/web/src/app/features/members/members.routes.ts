import { inject } from '@angular/core';
import { CanActivateFn, Router, Routes } from '@angular/router';
import { SessionStore } from '../../core/session-store';
import { Members } from './members';

/**
 * Opens members of `:orgId` for people who manage members there, or for marketplace admins.
 * When the person belongs to that organisation it also becomes the active one, so a shared
 * link opens in the right context.
 */
export const membersGuard: CanActivateFn = async (route) => {
  const session = inject(SessionStore);
  const router = inject(Router);
  await session.ensureLoaded();
  const organisationId = Number(route.paramMap.get('orgId'));
  if (session.organisations().some((o) => o.id === organisationId)) {
    session.selectOrganisation(organisationId);
  }
  const allowed =
    session.isAdmin() ||
    (session.activeOrganisation()?.id === organisationId && session.canManageMembers());
  return allowed || router.createUrlTree(['/']);
};

/** `/organisations/:orgId/members`. */
export const membersRoutes: Routes = [
  { path: '', component: Members, canActivate: [membersGuard], title: 'Members' },
];
