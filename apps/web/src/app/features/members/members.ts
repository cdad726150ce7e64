import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatMenuModule } from '@angular/material/menu';
import { MatSelectModule } from '@angular/material/select';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import type { Member, MemberPage, Role } from '@evalon/contracts';
import { memberSortFields } from '@evalon/contracts/values';
import { DateTime } from 'luxon';
import { firstValueFrom } from 'rxjs';
import { roles as allRoles, invitableRoles } from '@evalon/contracts/values';
import { Notifier } from '../../core/notifier';
import { roleLabels } from '../../core/roles';
import { SessionStore } from '../../core/session-store';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { ListPage, ListPageParts, listQuery, listSource, listWords } from '../../shared/list-page';
import { PageHeader } from '../../shared/page-header/page-header';
import { InviteDialog, InviteDialogData } from './invite-dialog';
import { MembersApi } from './members-api';
import { MemberStatus, statusIcons, statusLabels, statusOf } from './member-status';
import { timeSince } from '../../shared/relative-time';

/** A member with what the table shows already worked out. */
interface MemberRow {
  readonly member: Member;
  readonly status: MemberStatus;
  /** Whether this row is the signed-in person (who cannot change their own role or access). */
  readonly isSelf: boolean;
  /** Whether the signed-in person may change this member's role and access. */
  readonly manageable: boolean;
  readonly roleLabel: string;
  readonly statusLabel: string;
  readonly statusIcon: string;
  readonly lastSignIn: { relative: string; exact: string; iso: string } | null;
}

/** Members of an organisation: who they are, their role and status; invite and manage them. */
@Component({
  selector: 'ev-members',
  imports: [
    EmptyState,
    ListPageParts,
    MatButtonModule,
    MatCardModule,
    MatChipsModule,
    MatFormFieldModule,
    MatIconModule,
    MatMenuModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    PageHeader,
  ],
  templateUrl: './members.html',
  styleUrl: './members.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Members {
  private readonly api = inject(MembersApi);
  private readonly session = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);

  /** `:orgId` from the route. */
  readonly orgId = input.required<string>();

  protected readonly organisationId = computed(() => Number(this.orgId()));
  protected readonly organisation = computed(
    () => this.session.organisations().find((o) => o.id === this.organisationId()) ?? null,
  );
  protected readonly organisationName = computed(
    () => this.organisation()?.name ?? `Organisation ${this.organisationId()}`,
  );
  /**
   * Roles the person may hand out here (the contract's matrix). A platform admin looking at an
   * organisation they don't belong to gets every role; the server refuses ones that don't fit.
   */
  protected readonly assignableRoles = computed<readonly Role[]>(() => {
    const organisation = this.organisation();
    if (!organisation) return this.session.isAdmin() ? allRoles : [];
    const heldHere = (this.session.user()?.memberships ?? [])
      .filter((m) => m.organisationId === organisation.id)
      .map((m) => m.role);
    return invitableRoles(organisation.kind, heldHere, this.session.isAdmin());
  });

  protected readonly roleLabels = roleLabels;
  protected readonly columns = ['name', 'role', 'status', 'lastSignIn', 'actions'];

  /** Page, size, order and search words, in the URL. */
  protected readonly query = listQuery({
    sortFields: memberSortFields,
    defaultSort: { field: 'name', dir: 'asc' },
  });
  /** Membership being changed right now (its controls are disabled meanwhile). */
  protected readonly busyMembership = signal<number | null>(null);

  /** The page of members the URL asks for, with what each row shows. */
  protected readonly members = listSource({
    params: () => ({ organisationId: this.organisationId(), request: this.query.request() }),
    load: ({ organisationId, request }) => this.api.page(organisationId, request),
    rows: (answer: MemberPage) => this.toRows(answer.items),
    key: (row) => row.member.membershipId,
  });

  /** The list as its template's parts see it. */
  protected readonly list: ListPage = {
    query: this.query,
    source: this.members,
    words: listWords('person', 'members', {
      noMatch: (q) => `No one matches “${q}”.`,
      clear: null,
    }),
  };

  /** The table's accessible name. */
  protected readonly tableLabel = computed(() => `Members of ${this.organisationName()}`);

  protected readonly summary = computed(() => {
    const answer = this.members.answer();
    if (!answer) return '';
    const { total, pending, deactivated } = answer;
    const parts = [`${total} ${total === 1 ? 'person' : 'people'}`];
    if (pending) parts.push(`${pending} invitation${pending === 1 ? '' : 's'} waiting`);
    if (deactivated) parts.push(`${deactivated} deactivated`);
    return parts.join(' · ');
  });

  private toRows(members: readonly Member[]): MemberRow[] {
    const me = this.session.user()?.id;
    const zone = this.session.timeZone();
    const assignable = this.assignableRoles();
    const now = new Date();
    return members.map((member) => {
      const at = member.lastSignInAt ? DateTime.fromISO(member.lastSignInAt, { zone }) : null;
      const status = statusOf(member);
      return {
        member,
        status,
        isSelf: member.userId === me,
        manageable: member.userId !== me && assignable.includes(member.role),
        roleLabel: roleLabels[member.role],
        statusLabel: statusLabels[status],
        statusIcon: statusIcons[status],
        lastSignIn:
          at && at.isValid
            ? {
                relative: timeSince(at.toISO() ?? '', now),
                exact: at.toLocaleString(DateTime.DATETIME_MED),
                iso: at.toISO() ?? '',
              }
            : null,
      };
    });
  }

  /** Changes one member on hand after the server confirmed it. */
  private patchMember(membershipId: number, change: Partial<Member>): void {
    this.members.update((answer) => ({
      ...answer,
      items: answer.items.map((m) => (m.membershipId === membershipId ? { ...m, ...change } : m)),
    }));
  }

  protected openInvite(): void {
    const data: InviteDialogData = {
      organisationId: this.organisationId(),
      organisationName: this.organisationName(),
      roles: this.assignableRoles(),
    };
    this.dialog
      .open<InviteDialog, InviteDialogData, string>(InviteDialog, {
        data,
        width: '520px',
        maxWidth: 'calc(100vw - 32px)',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((email) => {
        if (!email) return;
        this.notifier.success(`Invitation sent to ${email}.`);
        this.members.reload();
      });
  }

  protected async changeRole(row: MemberRow, role: Role): Promise<void> {
    if (role === row.member.role) return;
    this.busyMembership.set(row.member.membershipId);
    try {
      await firstValueFrom(
        this.api.changeRole(this.organisationId(), row.member.membershipId, role),
        { defaultValue: undefined },
      );
      this.patchMember(row.member.membershipId, { role });
      this.notifier.success(`${row.member.name} is now ${article(roleLabels[role])}.`);
    } catch (error) {
      this.notifier.error(error);
      // Re-read the list so the select shows the role the server kept.
      this.members.reload();
    } finally {
      this.busyMembership.set(null);
    }
  }

  protected async setActive(row: MemberRow, active: boolean): Promise<void> {
    const { name, membershipId } = row.member;
    const organisation = this.organisationName();
    const confirmed = await firstValueFrom(
      confirmAction(
        this.dialog,
        active
          ? {
              title: `Reactivate ${name}?`,
              message: `${name} will be able to sign in to ${organisation} again with their existing password.`,
              confirmLabel: 'Reactivate',
            }
          : {
              title: `Deactivate ${name}?`,
              message: `${name} won’t be able to sign in to ${organisation} until someone reactivates them. Their records and history stay in Evalon.`,
              confirmLabel: 'Deactivate',
              destructive: true,
            },
      ),
    );
    if (!confirmed) return;
    this.busyMembership.set(membershipId);
    try {
      const request = active
        ? this.api.reactivate(this.organisationId(), membershipId)
        : this.api.deactivate(this.organisationId(), membershipId);
      await firstValueFrom(request, { defaultValue: undefined });
      this.patchMember(membershipId, { active });
      this.notifier.success(active ? `${name} can sign in again.` : `${name} is deactivated.`);
    } catch (error) {
      this.notifier.error(error);
    } finally {
      this.busyMembership.set(null);
    }
  }

  /** Sends a pending member a fresh invitation link (the server retires the older ones). */
  protected async resendInvitation(row: MemberRow): Promise<void> {
    const { email, membershipId } = row.member;
    this.busyMembership.set(membershipId);
    try {
      await firstValueFrom(this.api.resendInvitation(this.organisationId(), membershipId), {
        defaultValue: undefined,
      });
      this.notifier.success(`A new invitation is on its way to ${email}.`);
    } catch (error) {
      this.notifier.error(error);
      // The person may have accepted meanwhile; show where they stand now.
      this.members.reload();
    } finally {
      this.busyMembership.set(null);
    }
  }
}

/** "a Clinician", "an Admin": the indefinite article for a role label. */
function article(label: string): string {
  return `${/^[aeiou]/i.test(label) ? 'an' : 'a'} ${label.toLowerCase()}`;
}
