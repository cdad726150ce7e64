import {
  ChangeDetectionStrategy,
  Component,
  DOCUMENT,
  InjectionToken,
  LOCALE_ID,
  computed,
  inject,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatBadge } from '@angular/material/badge';
import { MatIconButton } from '@angular/material/button';
import { MatDivider } from '@angular/material/divider';
import { MatIcon } from '@angular/material/icon';
import { MatMenu, MatMenuContent, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { NavigationEnd, Router, RouterLink } from '@angular/router';
import type { Notification } from '@evalon/contracts';
import {
  EMPTY,
  distinctUntilChanged,
  filter,
  fromEvent,
  map,
  merge,
  of,
  switchMap,
  timer,
} from 'rxjs';
import { timeAgo } from '../../shared/relative-time';
import { SessionStore } from '../session-store';
import { BELL_LATEST, NotificationInbox } from './notification-inbox';

/** How often the bell asks for news while the tab is visible: every 30 s (product choice). */
export const NOTIFICATION_POLL_MS = new InjectionToken<number>('NOTIFICATION_POLL_MS', {
  providedIn: 'root',
  factory: () => 30_000,
});

/**
 * The bell in the top bar: the unread count as a badge, and a menu with the latest few
 * notifications, "Mark all as read" and the way to all of them. It asks for news every 30 s
 * while the tab is visible (not at all while hidden, at once when it shows again) and after
 * every navigation.
 */
@Component({
  selector: 'ev-notification-bell',
  imports: [
    MatBadge,
    MatDivider,
    MatIcon,
    MatIconButton,
    MatMenu,
    MatMenuContent,
    MatMenuItem,
    MatMenuTrigger,
    RouterLink,
  ],
  templateUrl: './notification-bell.html',
  styleUrl: './notification-bell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotificationBell {
  protected readonly inbox = inject(NotificationInbox);
  private readonly router = inject(Router);
  private readonly session = inject(SessionStore);
  private readonly locale = inject(LOCALE_ID);

  protected readonly shown = BELL_LATEST;
  protected readonly label = computed(() => {
    const n = this.inbox.unreadCount();
    return n === 0 ? 'Notifications' : `Notifications, ${n} unread`;
  });

  constructor() {
    const document = inject(DOCUMENT);
    const pollMs = inject(NOTIFICATION_POLL_MS);
    const visible = merge(of(null), fromEvent(document, 'visibilitychange')).pipe(
      map(() => document.visibilityState !== 'hidden'),
      distinctUntilChanged(),
    );
    const navigations = this.router.events.pipe(filter((e) => e instanceof NavigationEnd));
    visible
      .pipe(
        switchMap((isVisible) => (isVisible ? merge(timer(0, pollMs), navigations) : EMPTY)),
        takeUntilDestroyed(),
      )
      .subscribe(() => this.inbox.refresh());
  }

  /** "5 minutes ago", in the person's zone for older dates. */
  protected when(notification: Notification): string {
    return timeAgo(notification.createdAt, new Date(), this.locale, this.session.timeZone());
  }

  /** Opens what the notification is about, marking it read on the way. */
  protected open(notification: Notification): void {
    if (!notification.readAt)
      this.inbox.markRead(notification.id).subscribe({ error: () => undefined });
    if (notification.link) void this.router.navigateByUrl(notification.link);
  }

  protected markAllRead(): void {
    this.inbox.markAllRead().subscribe({ error: () => undefined });
  }
}
