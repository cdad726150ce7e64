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
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatTableModule } from '@angular/material/table';
import type { OutboxMessage, OutboxStatus } from '@evalon/contracts';
import { filter, switchMap, tap } from 'rxjs';
import { ApiError } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { outboxStatusLabels } from '../../shared/deposit-rules';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { formatInstant } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { OutboxApi } from './outbox-api';
import { LoadError, LoadingBar, loadOnChange } from '../../shared/list-page';

/** The statuses the admin can look at, most useful first. */
const shownStatuses: readonly OutboxStatus[] = ['parked', 'pending', 'sent'];

/**
 * The platform admin's view of the e-mail outbox: messages that could not be delivered (parked
 * after their attempts ran out), with the last error, and "Send again" after a confirmation;
 * also what is waiting and what was sent, to check a delivery.
 */
@Component({
  selector: 'ev-outbox-page',
  imports: [
    LoadError,
    LoadingBar,
    EmptyState,
    MatButtonModule,
    MatButtonToggleModule,
    MatCardModule,
    MatIconModule,
    MatTableModule,
    PageHeader,
  ],
  templateUrl: './outbox-page.html',
  styleUrl: './outbox-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutboxPage {
  private readonly api = inject(OutboxApi);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);
  private readonly session = inject(SessionStore);
  private readonly locale = inject(LOCALE_ID);

  protected readonly statuses = shownStatuses;
  protected readonly statusLabels = outboxStatusLabels;
  protected readonly status = signal<OutboxStatus>('parked');
  protected readonly messages = signal<OutboxMessage[]>([]);
  protected readonly loading = signal(true);
  protected readonly loaded = signal(false);
  protected readonly loadError = signal<string | null>(null);
  /** The message being sent again. */
  protected readonly resending = signal<number | null>(null);
  private readonly attempt = signal(0);

  protected readonly columns = computed(() =>
    this.status() === 'parked'
      ? ['to', 'subject', 'attempts', 'lastError', 'created', 'action']
      : ['to', 'subject', 'attempts', 'lastError', 'created'],
  );

  constructor() {
    loadOnChange({
      params: computed(() => ({ status: this.status(), attempt: this.attempt() })),
      load: ({ status }) => this.api.list(status),
      loading: this.loading,
      error: this.loadError,
      done: (messages) => {
        this.messages.set(messages);
        this.loaded.set(true);
      },
    });
  }

  protected setStatus(status: OutboxStatus): void {
    this.status.set(status);
  }

  protected retry(): void {
    this.attempt.update((n) => n + 1);
  }

  protected when(at: string): string {
    return formatInstant(at, this.session.timeZone(), this.locale);
  }

  /** Puts a parked message back in line, after the admin confirms. */
  protected resend(message: OutboxMessage): void {
    const to = message.to.join(', ');
    confirmAction(this.dialog, {
      title: 'Send this e-mail again?',
      message: `“${message.subject}” goes back in line for ${to}, with its attempts counted from zero. The recipient may get it twice if an earlier attempt did arrive.`,
      confirmLabel: 'Send again',
    })
      .pipe(
        filter(Boolean),
        tap(() => this.resending.set(message.id)),
        switchMap(() => this.api.resend(message.id)),
      )
      .subscribe({
        next: () => {
          this.resending.set(null);
          this.messages.update((list) => list.filter((m) => m.id !== message.id));
          this.notifier.success(`“${message.subject}” is back in line; it goes out in a moment.`);
        },
        error: (error: unknown) => {
          this.resending.set(null);
          this.notifier.error(error);
          // Someone else sent it again meanwhile: show the list as it now is.
          if (error instanceof ApiError && error.status === 409) this.retry();
        },
      });
  }
}
