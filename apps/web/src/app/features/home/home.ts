import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { organisationKindLabels, roleLabels } from '../../core/roles';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { PageHeader } from '../../shared/page-header/page-header';
import { nextStepsFor } from './next-steps';

/** "Good morning" etc. for an hour of the day (0–23). */
export function greetingFor(hour: number): string {
  if (hour >= 5 && hour < 12) return 'Good morning';
  if (hour >= 12 && hour < 18) return 'Good afternoon';
  return 'Good evening';
}

/** The hour (0–23) now in `timeZone`. */
function hourIn(timeZone: string, now = new Date()): number {
  try {
    return Number(
      new Intl.DateTimeFormat('en-GB', { hour: 'numeric', hourCycle: 'h23', timeZone }).format(now),
    );
  } catch {
    return now.getHours(); // An unknown zone name falls back to the device clock.
  }
}

/** The start page: a greeting, next steps for the person's roles and the cautions. */
@Component({
  selector: 'ev-home',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './home.html',
  styleUrl: './home.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Home {
  protected readonly session = inject(SessionStore);

  protected readonly greeting = computed(() => {
    const firstName = this.session.user()?.name.trim().split(/\s+/)[0] ?? '';
    const hello = greetingFor(hourIn(this.session.timeZone()));
    return firstName ? `${hello}, ${firstName}` : hello;
  });

  protected readonly context = computed(() => {
    const organisation = this.session.activeOrganisation();
    if (!organisation) return null;
    const roles = this.session
      .roles()
      .map((r) => roleLabels[r])
      .join(' and ');
    return `${organisation.name} · ${organisationKindLabels[organisation.kind]}${roles ? ` · ${roles}` : ''}`;
  });

  protected readonly steps = computed(() => nextStepsFor(this.session.roles()));

  protected readonly membersLink = computed(() => {
    const organisation = this.session.activeOrganisation();
    return organisation && this.session.canManageMembers()
      ? `/organisations/${organisation.id}/members`
      : null;
  });
}
