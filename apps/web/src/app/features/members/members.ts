import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatMenuModule } from '@angular/material/menu';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import type { Member, Role } from '@evalon/contracts';
import { DateTime } from 'luxon';
import { firstValueFrom } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { allRoles, invitableRoles } from '../../core/contract-rules';
import { Notifier } from '../../core/notifier';
import { roleLabels } from '../../core/roles';
import { SessionStore } from '../../core/session-store';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { PageHeader } from '../../shared/page-header/page-header';
import { InviteDialog, InviteDialogData } from './invite-dialog';
import { MembersApi } from './members-api';
import { MemberStatus, statusIcons, statusLabels, statusOf } from './member-status';

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
    MatButtonModule,
    MatCardModule,
    MatChipsModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatMenuModule,
    MatPaginatorModule,
    MatProgressBarModule,
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

  private readonly members = signal<Member[]>([]);
  protected readonly loading = signal(false);
  /** Whether the list has been loaded at least once for this organisation. */
  protected readonly loaded = signal(false);
  protected readonly loadError = signal<string | null>(null);
  /** Membership being changed right now (its controls are disabled meanwhile). */
  protected readonly busyMembership = signal<number | null>(null);
  protected readonly filterText = signal('');

  protected readonly rows = computed<MemberRow[]>(() => {
    const me = this.session.user()?.id;
    const zone = this.session.timeZone();
    const assignable = this.assignableRoles();
    return this.members().map((member) => {
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
                relative: at.toRelative() ?? '',
                exact: at.toLocaleString(DateTime.DATETIME_MED),
                iso: at.toISO() ?? '',
              }
            : null,
      };
    });
  });

  protected readonly summary = computed(() => {
    const rows = this.rows();
    const pending = rows.filter((r) => r.status === 'pending').length;
    const deactivated = rows.filter((r) => r.status === 'deactivated').length;
    const parts = [`${rows.length} ${rows.length === 1 ? 'person' : 'people'}`];
    if (pending) parts.push(`${pending} invitation${pending === 1 ? '' : 's'} waiting`);
    if (deactivated) parts.push(`${deactivated} deactivated`);
    return parts.join(' · ');
  });

  protected readonly dataSource = new MatTableDataSource<MemberRow>([]);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    this.dataSource.filterPredicate = (row, filter) =>
      [row.member.name, row.member.email, row.roleLabel, row.statusLabel]
        .join(' ')
        .toLowerCase()
        .includes(filter);
    this.dataSource.sortingDataAccessor = (row, column) => {
      switch (column) {
        case 'role':
          return row.roleLabel;
        case 'status':
          return row.statusLabel;
        case 'lastSignIn':
          return row.member.lastSignInAt ? Date.parse(row.member.lastSignInAt) : 0;
        default:
          return row.member.name.toLocaleLowerCase();
      }
    };

    effect(() => {
      const id = this.organisationId();
      untracked(() => void this.load(id));
    });
    effect(() => {
      this.dataSource.data = this.rows();
    });
    effect(() => {
      this.dataSource.filter = this.filterText().trim().toLowerCase();
    });
    effect(() => {
      this.dataSource.sort = this.sort() ?? null;
      this.dataSource.paginator = this.paginator() ?? null;
    });
  }

  protected reload(): void {
    void this.load(this.organisationId());
  }

  protected setFilter(event: Event): void {
    this.filterText.set((event.target as HTMLInputElement).value);
    this.paginator()?.firstPage();
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
        this.reload();
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
      this.members.update((list) =>
        list.map((m) => (m.membershipId === row.member.membershipId ? { ...m, role } : m)),
      );
      this.notifier.success(`${row.member.name} is now ${article(roleLabels[role])}.`);
    } catch (error) {
      this.notifier.error(error);
      // Re-read the list so the select shows the role the server kept.
      void this.load(this.organisationId());
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
      this.members.update((list) =>
        list.map((m) => (m.membershipId === membershipId ? { ...m, active } : m)),
      );
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
      void this.load(this.organisationId());
    } finally {
      this.busyMembership.set(null);
    }
  }

  private async load(organisationId: number): Promise<void> {
    this.loading.set(true);
    this.loadError.set(null);
    try {
      const members = await firstValueFrom(this.api.list(organisationId));
      if (organisationId !== this.organisationId()) return; // An older answer; a newer load runs.
      this.members.set(members);
      this.loaded.set(true);
    } catch (error) {
      if (organisationId !== this.organisationId()) return;
      this.loadError.set(messageOf(error));
    } finally {
      if (organisationId === this.organisationId()) this.loading.set(false);
    }
  }
}

/** "a Clinician", "an Admin": the indefinite article for a role label. */
function article(label: string): string {
  return `${/^[aeiou]/i.test(label) ? 'an' : 'a'} ${label.toLowerCase()}`;
}
