import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  computed,
  inject,
  signal,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { Router } from '@angular/router';
import type { Notification } from '@evalon/contracts';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { NotificationInbox } from '../../core/shell/notification-inbox';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { formatInstant } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { timeAgo } from '../../shared/relative-time';
import { LoadError, LoadingBar, loadOnChange } from '../../shared/list-page';

/** How many notifications a page of the list holds. */
export const NOTIFICATION_PAGE_SIZE = 20;

/** What the list shows: unread ones only, or all. */
export type NotificationFilter = 'unread' | 'all';

/** Icons by the first part of a notification's kind (`loan.confirmed` → loan). */
const kindIcons: Record<string, string> = {
  'loan.requested': 'inbox',
  'loan.approved': 'payments',
  'loan.confirmed': 'event_available',
  'loan.declined': 'block',
  'loan.cancelled': 'cancel',
  'loan.expired': 'timer_off',
};

/** A notification ready to show. */
interface Row {
  readonly notification: Notification;
  readonly icon: string;
  readonly ago: string;
  readonly at: string;
}

/**
 * All of the person's notifications, newest first: unread or all, open one (which marks it
 * read and goes to what it is about), mark everything read, and older ones page by page.
 */
@Component({
  selector: 'ev-notification-list',
  imports: [
    LoadError,
    LoadingBar,
    EmptyState,
    MatButtonModule,
    MatButtonToggleModule,
    MatCardModule,
    MatIconModule,
    PageHeader,
  ],
  templateUrl: './notification-list.html',
  styleUrl: './notification-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotificationList {
  protected readonly inbox = inject(NotificationInbox);
  private readonly router = inject(Router);
  private readonly notifier = inject(Notifier);
  private readonly session = inject(SessionStore);
  private readonly locale = inject(LOCALE_ID);

  protected readonly filter = signal<NotificationFilter>('all');
  protected readonly items = signal<Notification[]>([]);
  protected readonly loading = signal(true);
  protected readonly loadingMore = signal(false);
  protected readonly loadError = signal<string | null>(null);
  /** Whether older notifications may exist beyond the last page. */
  protected readonly hasMore = signal(false);
  protected readonly markingAll = signal(false);
  private readonly attempt = signal(0);

  protected readonly rows = computed<Row[]>(() => {
    const zone = this.session.timeZone();
    const now = new Date();
    return this.items().map((notification) => ({
      notification,
      icon: kindIcons[notification.kind] ?? 'notifications',
      ago: timeAgo(notification.createdAt, now, this.locale, zone),
      at: formatInstant(notification.createdAt, zone, this.locale),
    }));
  });

  constructor() {
    loadOnChange({
      params: computed(() => ({ filter: this.filter(), attempt: this.attempt() })),
      load: ({ filter }) =>
        this.inbox.list({ unreadOnly: filter === 'unread', limit: NOTIFICATION_PAGE_SIZE }),
      loading: this.loading,
      error: this.loadError,
      done: (answer) => {
        this.items.set(answer.items);
        this.hasMore.set(answer.items.length === NOTIFICATION_PAGE_SIZE);
      },
    });
  }

  protected setFilter(value: NotificationFilter): void {
    this.filter.set(value);
  }

  protected retry(): void {
    this.attempt.update((n) => n + 1);
  }

  /** The next page of older notifications. */
  protected loadMore(): void {
    const last = this.items().at(-1);
    if (!last || this.loadingMore()) return;
    this.loadingMore.set(true);
    this.inbox
      .list({
        unreadOnly: this.filter() === 'unread',
        limit: NOTIFICATION_PAGE_SIZE,
        before: last.id,
      })
      .subscribe({
        next: (answer) => {
          this.items.update((list) => [...list, ...answer.items]);
          this.hasMore.set(answer.items.length === NOTIFICATION_PAGE_SIZE);
          this.loadingMore.set(false);
        },
        error: (error: unknown) => {
          this.loadingMore.set(false);
          this.notifier.error(error);
        },
      });
  }

  /** Marks it read, then opens what it is about (if it links anywhere). */
  protected open(notification: Notification): void {
    if (!notification.readAt) {
      this.inbox.markRead(notification.id).subscribe({
        next: (answer) => this.replace(answer.notification),
        error: () => undefined, // Opening matters more than the read mark; the next load retries.
      });
    }
    if (notification.link) void this.router.navigateByUrl(notification.link);
  }

  /** Marks one read without leaving the list. */
  protected markRead(notification: Notification): void {
    this.inbox.markRead(notification.id).subscribe({
      next: (answer) => this.replace(answer.notification),
      error: (error: unknown) => this.notifier.error(error),
    });
  }

  protected markAllRead(): void {
    if (this.markingAll()) return;
    this.markingAll.set(true);
    this.inbox.markAllRead().subscribe({
      next: (answer) => {
        this.markingAll.set(false);
        const now = new Date().toISOString();
        this.items.update((list) =>
          this.filter() === 'unread' ? [] : list.map((n) => (n.readAt ? n : { ...n, readAt: now })),
        );
        this.notifier.success(
          answer.updated === 1
            ? '1 notification marked as read.'
            : `${answer.updated} notifications marked as read.`,
        );
      },
      error: (error: unknown) => {
        this.markingAll.set(false);
        this.notifier.error(error);
      },
    });
  }

  private replace(updated: Notification): void {
    this.items.update((list) => list.map((n) => (n.id === updated.id ? updated : n)));
  }
}
