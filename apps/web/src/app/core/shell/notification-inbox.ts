import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import type {
  Notification,
  NotificationList,
  NotificationResponse,
  ReadAllResponse,
} from '@evalon/contracts';
import { Observable, Subscription, tap } from 'rxjs';

/** How many notifications the bell's menu shows. */
export const BELL_LATEST = 5;

/**
 * The signed-in person's in-app notifications (`/api/notifications`): the unread count and the
 * latest few for the bell, and the calls the notifications page makes. One instance for the app,
 * so marking something read on the page updates the bell at once. Deliberately small: it is in
 * the eagerly loaded shell.
 */
@Injectable({ providedIn: 'root' })
export class NotificationInbox {
  private readonly http = inject(HttpClient);
  private readonly latestState = signal<Notification[]>([]);
  private readonly unreadState = signal(0);
  private readonly loadedState = signal(false);
  private running: Subscription | null = null;

  /** How many notifications are unread, across all of them. */
  readonly unreadCount = this.unreadState.asReadonly();
  /** The newest few, read or not. */
  readonly latest = this.latestState.asReadonly();
  /** Whether the bell has heard from the server at least once. */
  readonly loaded = this.loadedState.asReadonly();
  /** The badge text: the count, "99+" past 99, nothing at 0. */
  readonly badge = computed(() => {
    const n = this.unreadState();
    return n === 0 ? null : n > 99 ? '99+' : String(n);
  });

  /**
   * Reads the newest notifications and the unread count again. A refresh still on its way is
   * dropped in favour of this one; a failure keeps what the bell showed (the next poll retries).
   */
  refresh(): void {
    this.running?.unsubscribe();
    this.running = this.list({ limit: BELL_LATEST }).subscribe({
      next: (answer) => {
        this.latestState.set(answer.items);
        this.unreadState.set(answer.unreadCount);
        this.loadedState.set(true);
      },
      error: () => undefined,
    });
  }

  /** One page of notifications, newest first: unread only, and/or older than `before` (an id). */
  list(
    query: { unreadOnly?: boolean; limit?: number; before?: number } = {},
  ): Observable<NotificationList> {
    let params = new HttpParams().set('limit', query.limit ?? 50);
    if (query.unreadOnly) params = params.set('unread', 'true');
    if (query.before) params = params.set('before', query.before);
    return this.http
      .get<NotificationList>('/api/notifications', { params })
      .pipe(tap((answer) => this.unreadState.set(answer.unreadCount)));
  }

  /** Marks one read; the bell's count and list follow. */
  markRead(id: number): Observable<NotificationResponse> {
    return this.http.post<NotificationResponse>(`/api/notifications/${id}/read`, {}).pipe(
      tap((answer) => {
        this.unreadState.set(answer.unreadCount);
        this.latestState.update((list) => list.map((n) => (n.id === id ? answer.notification : n)));
      }),
    );
  }

  /** Marks every notification read. */
  markAllRead(): Observable<ReadAllResponse> {
    return this.http.post<ReadAllResponse>('/api/notifications/read-all', {}).pipe(
      tap((answer) => {
        this.unreadState.set(answer.unreadCount);
        const now = new Date().toISOString();
        this.latestState.update((list) => list.map((n) => (n.readAt ? n : { ...n, readAt: now })));
      }),
    );
  }

  /** Forgets everything (after sign-out). */
  clear(): void {
    this.running?.unsubscribe();
    this.latestState.set([]);
    this.unreadState.set(0);
    this.loadedState.set(false);
  }
}
