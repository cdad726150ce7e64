import { Signal, computed, inject } from '@angular/core';
import { OrganisationChoice, SessionStore } from '../core/session-store';

/**
 * The lender the person is acting for (chosen in the top bar), or null when that is a hospital
 * or nothing is chosen: the fleet pages show their "belongs to a lender" state then. Call in an
 * injection context (a field initialiser).
 */
export function activeLender(): Signal<OrganisationChoice | null> {
  const session = inject(SessionStore);
  return computed(() => {
    const organisation = session.activeOrganisation();
    return organisation?.kind === 'lender' ? organisation : null;
  });
}
