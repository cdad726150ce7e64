import { inject } from '@angular/core';
import { Router, Routes } from '@angular/router';
import { roleGuard, signedIn, signedOut } from './core/guards';
import { SessionStore } from './core/session-store';
import { Shell } from './core/shell/shell';
import { placeholderRoutes } from './features/placeholder/placeholder.routes';

/** The app's routes: signed-out pages, then everything inside the shell. Only the shell is eager. */
export const routes: Routes = [
  {
    path: 'sign-in',
    canActivate: [signedOut],
    loadChildren: () => import('./features/sign-in/sign-in.routes').then((m) => m.signInRoutes),
  },
  {
    path: 'forgot-password',
    loadChildren: () =>
      import('./features/password-reset/password-reset.routes').then((m) => m.forgotPasswordRoutes),
  },
  {
    path: 'reset-password',
    loadChildren: () =>
      import('./features/password-reset/password-reset.routes').then((m) => m.resetPasswordRoutes),
  },
  {
    path: 'accept-invitation',
    loadChildren: () =>
      import('./features/invitation/invitation.routes').then((m) => m.invitationRoutes),
  },
  {
    path: '',
    component: Shell,
    canActivate: [signedIn],
    children: [
      {
        path: '',
        pathMatch: 'full',
        loadChildren: () => import('./features/home/home.routes').then((m) => m.homeRoutes),
      },
      {
        path: 'profile',
        loadChildren: () =>
          import('./features/profile/profile.routes').then((m) => m.profileRoutes),
      },
      {
        // A short address for "members of the organisation I'm working in".
        path: 'members',
        canActivate: [
          async () => {
            const session = inject(SessionStore);
            const router = inject(Router);
            await session.ensureLoaded();
            const organisation = session.activeOrganisation();
            return router.createUrlTree(
              organisation ? ['/organisations', organisation.id, 'members'] : ['/'],
            );
          },
        ],
        children: [],
      },
      {
        path: 'organisations/:orgId/members',
        loadChildren: () =>
          import('./features/members/members.routes').then((m) => m.membersRoutes),
      },
      {
        path: 'catalog',
        canActivate: [roleGuard('fleet_manager')],
        loadChildren: () =>
          import('./features/catalog/catalog.routes').then((m) => m.catalogRoutes),
      },
      {
        // Coordinators open units read-only; the pages hide what only fleet managers may change.
        path: 'units',
        canActivate: [roleGuard('fleet_manager', 'coordinator')],
        loadChildren: () => import('./features/units/units.routes').then((m) => m.unitsRoutes),
      },
      {
        path: 'approvals',
        canActivate: [roleGuard('fleet_manager')],
        loadChildren: () =>
          import('./features/approvals/approvals.routes').then((m) => m.approvalsRoutes),
      },
      {
        path: 'equipment',
        canActivate: [roleGuard('buyer')],
        loadChildren: () =>
          import('./features/equipment/equipment.routes').then((m) => m.equipmentRoutes),
      },
      {
        // Clinicians read their hospital's loans; only buyers request (guarded inside) and cancel.
        // The lender's people and the admin open single loans (from notifications and Home).
        path: 'loans',
        canActivate: [roleGuard('buyer', 'clinician', 'fleet_manager', 'coordinator', 'admin')],
        loadChildren: () => import('./features/loans/loans.routes').then((m) => m.loansRoutes),
      },
      {
        // Coordinators and fleet managers run the board; hospital people open their loans' legs.
        path: 'shipments',
        canActivate: [roleGuard('coordinator', 'fleet_manager', 'buyer', 'clinician', 'admin')],
        loadChildren: () =>
          import('./features/shipments/shipments.routes').then((m) => m.shipmentsRoutes),
      },
      {
        path: 'notifications',
        loadChildren: () =>
          import('./features/notifications/notifications.routes').then(
            (m) => m.notificationsRoutes,
          ),
      },
      {
        path: 'credit-agreements',
        canActivate: [roleGuard('fleet_manager')],
        loadChildren: () =>
          import('./features/credit-agreements/credit-agreements.routes').then(
            (m) => m.creditAgreementsRoutes,
          ),
      },
      {
        path: 'outbox',
        canActivate: [roleGuard('admin')],
        loadChildren: () => import('./features/outbox/outbox.routes').then((m) => m.outboxRoutes),
      },
      {
        // Hospital people list and ask; proctors open single visits offered to them.
        path: 'visits',
        canActivate: [roleGuard('buyer', 'clinician', 'proctor', 'admin')],
        loadChildren: () => import('./features/visits/visits.routes').then((m) => m.visitsRoutes),
      },
      {
        path: 'visit-settings',
        canActivate: [roleGuard('fleet_manager', 'buyer')],
        loadChildren: () =>
          import('./features/visit-settings/visit-settings.routes').then(
            (m) => m.visitSettingsRoutes,
          ),
      },
      {
        path: 'training',
        canActivate: [roleGuard('clinician')],
        loadChildren: () =>
          import('./features/training/training.routes').then((m) => m.trainingRoutes),
      },
      {
        path: 'proctor',
        canActivate: [roleGuard('proctor')],
        loadChildren: () =>
          import('./features/proctor/proctor.routes').then((m) => m.proctorRoutes),
      },
      ...placeholderRoutes,
      {
        path: '**',
        title: 'Page not found',
        loadComponent: () => import('./features/not-found/not-found').then((m) => m.NotFound),
      },
    ],
  },
];
