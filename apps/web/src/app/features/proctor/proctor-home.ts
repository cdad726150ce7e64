import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  LOCALE_ID,
  computed,
  inject,
  signal,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { Visit } from '@evalon/contracts';
import { interval } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { moneyText } from '../../shared/formats';
import { formatInstant, formatWindow } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { timeLeft, visitStateLabels } from '../../shared/visit-rules';
import { VisitApi } from '../visits/visit-api';

/**
 * The proctor's home: offers waiting for an answer (with the time left, accept, or decline with
 * a reason), then accepted and past visits, and links to profile, credentials and availability.
 */
@Component({
  selector: 'ev-proctor-home',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    PageHeader,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './proctor-home.html',
  styleUrl: './proctor-home.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProctorHome {
  private readonly api = inject(VisitApi);
  private readonly session = inject(SessionStore);
  private readonly locale = inject(LOCALE_ID);
  private readonly destroyRef = inject(DestroyRef);

  private readonly visits = signal<Visit[]>([]);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly busyId = signal<number | null>(null);
  private readonly now = signal(Date.now());
  protected readonly reasons = new Map<number, FormControl<string>>();
  protected readonly stateLabels = visitStateLabels;

  private readonly me = computed(() => this.session.user()?.id ?? null);
  protected readonly offers = computed(() =>
    this.visits().filter((v) => v.state === 'offered' && v.currentOffer?.proctorId === this.me()),
  );
  protected readonly mine = computed(() => this.visits().filter((v) => v.proctorId === this.me()));

  constructor() {
    this.load();
    interval(30_000)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => this.now.set(Date.now()));
  }

  protected reasonFor(id: number): FormControl<string> {
    let control = this.reasons.get(id);
    if (!control) {
      control = new FormControl('', { nonNullable: true });
      this.reasons.set(id, control);
    }
    return control;
  }

  protected days(v: Visit): string {
    return formatWindow(v.from, v.to, this.locale);
  }
  protected left(v: Visit): string {
    return v.currentOffer?.deadlineAt ? timeLeft(v.currentOffer.deadlineAt, this.now()) : '';
  }
  protected due(v: Visit): string {
    return v.currentOffer?.deadlineAt
      ? formatInstant(v.currentOffer.deadlineAt, this.session.timeZone(), this.locale)
      : '';
  }
  protected fee(v: Visit): string {
    return v.feeEstimate ? moneyText(v.feeEstimate, this.locale) : '';
  }

  protected load(): void {
    this.api
      .list({ role: 'proctor' })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (v) => {
          this.visits.set(v);
          this.loading.set(false);
        },
        error: (e: unknown) => {
          this.error.set(messageOf(e));
          this.loading.set(false);
        },
      });
  }

  protected accept(v: Visit): void {
    this.answer(v.id, this.api.accept(v.id));
  }

  protected decline(v: Visit): void {
    const reason = this.reasonFor(v.id).value.trim();
    if (reason.length < 3) {
      this.error.set('Say why you decline in a few words.');
      return;
    }
    this.answer(v.id, this.api.decline(v.id, reason));
  }

  private answer(id: number, call: ReturnType<VisitApi['accept']>): void {
    this.busyId.set(id);
    this.error.set(null);
    call.pipe(takeUntilDestroyed(this.destroyRef)).subscribe({
      next: () => {
        this.busyId.set(null);
        this.load();
      },
      error: (e: unknown) => {
        this.busyId.set(null);
        this.error.set(messageOf(e));
        this.load();
      },
    });
  }
}
