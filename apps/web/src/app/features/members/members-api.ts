import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { InviteRequest, Member, Role } from '@evalon/contracts';
import { Observable, map } from 'rxjs';

/** Talks to `/api/organisations/:orgId/members` and invitations. */
@Injectable({ providedIn: 'root' })
export class MembersApi {
  private readonly http = inject(HttpClient);

  /** Everyone in the organisation, including pending invitations and deactivated people. */
  list(organisationId: number): Observable<Member[]> {
    return this.http
      .get<{ items: Member[] }>(`/api/organisations/${organisationId}/members`)
      .pipe(map((r) => r.items));
  }

  /** Invites someone by e-mail with a role. */
  invite(organisationId: number, request: InviteRequest): Observable<unknown> {
    return this.http.post(`/api/organisations/${organisationId}/invitations`, request);
  }

  /** Gives a member another role. */
  changeRole(organisationId: number, membershipId: number, role: Role): Observable<unknown> {
    return this.http.patch(`/api/organisations/${organisationId}/members/${membershipId}`, {
      role,
    });
  }

  /** Stops a member from signing in to this organisation. */
  deactivate(organisationId: number, membershipId: number): Observable<unknown> {
    return this.http.post(
      `/api/organisations/${organisationId}/members/${membershipId}/deactivate`,
      null,
    );
  }

  /** Sends a fresh invitation link to someone who has not accepted yet; older links stop working. */
  resendInvitation(organisationId: number, membershipId: number): Observable<unknown> {
    return this.http.post(
      `/api/organisations/${organisationId}/members/${membershipId}/resend-invitation`,
      null,
    );
  }

  /** Lets a deactivated member sign in again. */
  reactivate(organisationId: number, membershipId: number): Observable<unknown> {
    return this.http.post(
      `/api/organisations/${organisationId}/members/${membershipId}/reactivate`,
      null,
    );
  }
}
