import { Injectable, computed, inject, signal } from '@angular/core';
import type { OrganisationKind, Role, SessionUser } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { ApiError } from './api-error';
import { AuthApi } from './auth-api';
import { hasAnyRole } from './navigation';
import { memberManagingRoles } from '@evalon/contracts/values';

/** An organisation the signed-in person belongs to. */
export interface OrganisationChoice {
  readonly id: number;
  readonly name: string;
  readonly kind: OrganisationKind;
}

/** localStorage key for the organisation the person last worked in. */
export const ACTIVE_ORGANISATION_KEY = 'evalon.activeOrganisationId';

function readStoredOrganisation(): number | null {
  try {
    const raw = globalThis.localStorage?.getItem(ACTIVE_ORGANISATION_KEY);
    const id = raw ? Number(raw) : NaN;
    return Number.isInteger(id) ? id : null;
  } catch {
    // Storage can be blocked (privacy settings); the first organisation is a fine default.
    return null;
  }
}

function storeOrganisation(id: number | null): void {
  try {
    if (id === null) globalThis.localStorage?.removeItem(ACTIVE_ORGANISATION_KEY);
    else globalThis.localStorage?.setItem(ACTIVE_ORGANISATION_KEY, String(id));
  } catch {
    // Not remembering the choice is harmless.
  }
}

/**
 * Who is signed in and in which organisation they are working. Everything role-dependent in
 * the client (navigation, guards, home page) reads these signals.
 */
@Injectable({ providedIn: 'root' })
export class SessionStore {
  private readonly api = inject(AuthApi);
  private readonly userState = signal<SessionUser | null>(null);
  private readonly chosenOrganisationId = signal<number | null>(readStoredOrganisation());
  /** Whether `/api/auth/me` has answered (with a person or a 401) since the page loaded. */
  private loaded = false;
  private pending: Promise<SessionUser | null> | null = null;

  /** The signed-in person, or null. */
  readonly user = this.userState.asReadonly();

  /** Whether someone is signed in. */
  readonly signedIn = computed(() => this.userState() !== null);

  /** Distinct organisations across the person's memberships, in the server's order. */
  readonly organisations = computed<OrganisationChoice[]>(() => {
    const seen = new Map<number, OrganisationChoice>();
    for (const m of this.userState()?.memberships ?? []) {
      if (!seen.has(m.organisationId)) {
        seen.set(m.organisationId, {
          id: m.organisationId,
          name: m.organisationName,
          kind: m.organisationKind,
        });
      }
    }
    return [...seen.values()];
  });

  /** The organisation the person is working in: the remembered choice, else the first one. */
  readonly activeOrganisation = computed<OrganisationChoice | null>(() => {
    const organisations = this.organisations();
    const chosen = this.chosenOrganisationId();
    return organisations.find((o) => o.id === chosen) ?? organisations[0] ?? null;
  });

  /** Roles the person holds in the active organisation. */
  readonly roles = computed<Role[]>(() => {
    const active = this.activeOrganisation();
    if (!active) return [];
    const roles = (this.userState()?.memberships ?? [])
      .filter((m) => m.organisationId === active.id)
      .map((m) => m.role);
    return [...new Set(roles)];
  });

  /** Whether the person may manage members of the active organisation. */
  readonly canManageMembers = computed(() => hasAnyRole(this.roles(), memberManagingRoles));

  /** Whether the person is a marketplace admin in any of their organisations. */
  readonly isAdmin = computed(
    () => this.userState()?.memberships.some((m) => m.role === 'admin') ?? false,
  );

  /** The person's own IANA time zone, else the browser's. */
  readonly timeZone = computed(
    () => this.userState()?.timeZone || Intl.DateTimeFormat().resolvedOptions().timeZone,
  );

  /** Whether the person holds any of `roles` in the active organisation. */
  hasAnyRole(roles: readonly Role[]): boolean {
    return hasAnyRole(this.roles(), roles);
  }

  /**
   * Loads the session once per page load and shares the answer between guards. A failure other
   * than 401 (server down, 5xx) is not remembered, so the next navigation asks again.
   */
  ensureLoaded(): Promise<SessionUser | null> {
    if (this.loaded) return Promise.resolve(this.userState());
    this.pending ??= firstValueFrom(this.api.me())
      .then((user) => {
        this.setUser(user);
        return user;
      })
      .catch((error: unknown) => {
        if (error instanceof ApiError && error.status === 401) {
          this.loaded = true;
          this.userState.set(null);
        }
        return null;
      })
      .finally(() => {
        this.pending = null;
      });
    return this.pending;
  }

  /** Records the person the server just signed in (or re-read). */
  setUser(user: SessionUser): void {
    this.loaded = true;
    this.userState.set(user);
  }

  /** Switches the organisation the person works in and remembers it on this device. */
  selectOrganisation(id: number): void {
    if (!this.organisations().some((o) => o.id === id)) return;
    this.chosenOrganisationId.set(id);
    storeOrganisation(id);
  }

  /** Forgets the person locally (after sign-out or when the server says the session ended). */
  clear(): void {
    this.loaded = true;
    this.userState.set(null);
  }

  /** Signs out on the server, then locally even if the server could not be reached. */
  async signOut(): Promise<void> {
    try {
      await firstValueFrom(this.api.logout(), { defaultValue: undefined });
    } finally {
      this.clear();
    }
  }
}
