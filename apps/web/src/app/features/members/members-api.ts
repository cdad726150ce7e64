import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { InviteRequest, MemberPage, Role } from '@evalon/contracts';
import { Observable } from 'rxjs';
import { listParams, type ListRequest } from '../../shared/list-page';

/** Talks to `/api/organisations/:orgId/members` and invitations. */
@Injectable({ providedIn: 'root' })
export class MembersApi {
  private readonly http = inject(HttpClient);

  /**
   * One page of the organisation's people, including pending invitations and deactivated
   * people; `q` matches name, e-mail, role or status words.
   */
  page(organisationId: number, request: ListRequest<string>): Observable<MemberPage> {
    return this.http.get<MemberPage>(`/api/organisations/${organisationId}/members`, {
      params: listParams(request),
    });
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
