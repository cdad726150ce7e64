import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, inject, viewChild } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatDivider } from '@angular/material/divider';
import { MatIcon } from '@angular/material/icon';
import { MatMenu, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { MatSidenav, MatSidenavContainer, MatSidenavContent } from '@angular/material/sidenav';
import { MatToolbar } from '@angular/material/toolbar';
import { Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { map } from 'rxjs';
import { navigationFor } from '../navigation';
import { organisationKindLabels, roleLabels } from '../roles';
import { SessionStore } from '../session-store';
import { NotificationBell } from './notification-bell';
import { NotificationInbox } from './notification-inbox';

/** Below this width the side navigation becomes a drawer that opens over the page. */
const compactQuery = '(max-width: 959.98px)';

/**
 * The signed-in frame: top bar (product, organisation switcher, notifications, person menu),
 * side navigation by role, and the page.
 */
@Component({
  selector: 'ev-shell',
  // Single components rather than whole modules keep the eagerly loaded bundle small (the list
  // module, for one, would bring the forms package along); navigation links are text buttons.
  imports: [
    MatButton,
    MatDivider,
    MatIcon,
    MatIconButton,
    MatMenu,
    MatMenuItem,
    MatMenuTrigger,
    MatSidenav,
    MatSidenavContainer,
    MatSidenavContent,
    MatToolbar,
    NotificationBell,
    RouterLink,
    RouterLinkActive,
    RouterOutlet,
  ],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  protected readonly session = inject(SessionStore);
  private readonly inbox = inject(NotificationInbox);
  private readonly router = inject(Router);
  private readonly sidenav = viewChild.required(MatSidenav);

  /** Whether the screen is narrow enough to turn the side navigation into a drawer. */
  protected readonly compact = toSignal(
    inject(BreakpointObserver)
      .observe(compactQuery)
      .pipe(map((state) => state.matches)),
    { initialValue: false },
  );

  protected readonly navigation = computed(() =>
    navigationFor(this.session.roles(), this.session.activeOrganisation()?.id ?? null),
  );

  protected readonly roleSummary = computed(() =>
    this.session
      .roles()
      .map((role) => roleLabels[role])
      .join(' · '),
  );

  protected readonly kindLabels = organisationKindLabels;

  protected readonly initials = computed(() => {
    const name = this.session.user()?.name.trim() ?? '';
    const parts = name.split(/\s+/).filter(Boolean);
    const letters = parts.length > 1 ? parts[0][0] + parts[parts.length - 1][0] : name.slice(0, 2);
    return letters.toUpperCase() || '?';
  });

  /** Closes the drawer after a link was chosen on small screens. */
  protected closeIfCompact(): void {
    if (this.compact()) void this.sidenav().close();
  }

  protected toggleNavigation(): void {
    void this.sidenav().toggle();
  }

  /**
   * Switches organisation. Members stays open for the new organisation when its roles allow;
   * any other page goes home, since what the person may see depends on the organisation.
   */
  protected switchOrganisation(id: number): void {
    if (id === this.session.activeOrganisation()?.id) return;
    const onMembers = /^\/organisations\/\d+\/members/.test(this.router.url);
    this.session.selectOrganisation(id);
    const target =
      onMembers && this.session.canManageMembers() ? `/organisations/${id}/members` : '/';
    void this.router.navigateByUrl(target);
  }

  protected async signOut(): Promise<void> {
    // The session is forgotten locally even when the server can't be reached, so go on anyway.
    await this.session.signOut().catch(() => undefined);
    this.inbox.clear();
    await this.router.navigate(['/sign-in'], { queryParams: { reason: 'signed-out' } });
  }
}
