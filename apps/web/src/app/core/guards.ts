import { inject } from '@angular/core';
import { CanActivateFn, Router } from '@angular/router';
import type { Role } from '@evalon/contracts';
import { SessionStore } from './session-store';

/** Lets signed-in people through; sends everyone else to sign-in, remembering where they were. */
export const signedIn: CanActivateFn = async (_route, state) => {
  const session = inject(SessionStore);
  const router = inject(Router);
  if (await session.ensureLoaded()) return true;
  const queryParams = state.url && state.url !== '/' ? { returnUrl: state.url } : {};
  return router.createUrlTree(['/sign-in'], { queryParams });
};

/** Keeps signed-in people away from the sign-in page: they go home instead. */
export const signedOut: CanActivateFn = async () => {
  const session = inject(SessionStore);
  const router = inject(Router);
  return (await session.ensureLoaded()) ? router.createUrlTree(['/']) : true;
};

/**
 * Lets through people who hold one of `roles` in the active organisation; others go home,
 * where the navigation only offers what their roles open.
 */
export function roleGuard(...roles: Role[]): CanActivateFn {
  return async () => {
    const session = inject(SessionStore);
    const router = inject(Router);
    await session.ensureLoaded();
    return session.hasAnyRole(roles) || router.createUrlTree(['/']);
  };
}
