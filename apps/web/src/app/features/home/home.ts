import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  computed,
  inject,
  signal,
} from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import type { Loan, LoanState } from '@evalon/contracts';
import { Observable, catchError, map, merge, of, shareReplay, startWith, switchMap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { organisationKindLabels, roleLabels } from '../../core/roles';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { todayIn } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { HOME_OUTBOX_LIMIT, HomeApi } from './home-api';
import {
  LiveSource,
  NextStep,
  StepSummary,
  approvalsSummary,
  arrivalsSummary,
  buyerLoansSummary,
  buyerVisitsSummary,
  nextStepsFor,
  outboxSummary,
  proctorOffersSummary,
  returnsSummary,
  shippingSummary,
} from './next-steps';

/** Where a live card stands: loading, failed, or showing its summary (null: the empty state). */
export type CardState =
  | { readonly status: 'loading' }
  | { readonly status: 'error'; readonly message: string }
  | { readonly status: 'ready'; readonly summary: StepSummary | null };

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

/**
 * The start page: a greeting, next steps for the person's roles (live from the API where the
 * feature exists: loans needing a deposit, requests waiting for approval, loans to ship, loans
 * coming to the campus, e-mails that could not be delivered) and the cautions. A card that fails
 * to load says so on its own; the rest of the page stays.
 */
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
  private readonly api = inject(HomeApi);
  private readonly locale = inject(LOCALE_ID);
  private readonly attempt = signal(0);
  /** Live cards by key. */
  protected readonly cardStates = signal<Readonly<Record<string, CardState>>>({});

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

  constructor() {
    toObservable(computed(() => ({ steps: this.steps(), attempt: this.attempt() })))
      .pipe(
        switchMap(({ steps }) => {
          const live = steps.filter((s): s is NextStep & { live: LiveSource } => !!s.live);
          this.cardStates.set(
            Object.fromEntries(live.map((s) => [s.key, { status: 'loading' } as CardState])),
          );
          // One read of each loan list per load, shared by the cards that need it.
          const loans = new Map<string, Observable<Loan[]>>();
          const loansIn = (state?: LoanState) => {
            const key = state ?? 'all';
            if (!loans.has(key)) loans.set(key, this.api.loans(state).pipe(shareReplay(1)));
            return loans.get(key)!;
          };
          return merge(
            ...live.map((step) =>
              this.summaryOf(step.live, loansIn).pipe(
                map((summary): CardState => ({ status: 'ready', summary })),
                catchError((error: unknown) =>
                  of<CardState>({ status: 'error', message: messageOf(error) }),
                ),
                startWith<CardState>({ status: 'loading' }),
                map((state) => [step.key, state] as const),
              ),
            ),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe(([key, state]) => this.cardStates.update((all) => ({ ...all, [key]: state })));
  }

  /** A card's state; cards without live content are always ready with their empty state. */
  protected stateOf(step: NextStep): CardState {
    return step.live
      ? (this.cardStates()[step.key] ?? { status: 'loading' })
      : { status: 'ready', summary: null };
  }

  /** Loads the live cards again (after a failure). */
  protected retry(): void {
    this.attempt.update((n) => n + 1);
  }

  private summaryOf(
    source: LiveSource,
    loansIn: (state?: LoanState) => Observable<Loan[]>,
  ): Observable<StepSummary | null> {
    const today = todayIn(this.session.timeZone());
    switch (source) {
      case 'buyer-loans':
        return loansIn().pipe(map((loans) => buyerLoansSummary(loans, this.locale)));
      case 'approvals':
        return loansIn('requested').pipe(map((loans) => approvalsSummary(loans, this.locale)));
      case 'shipping':
        return loansIn('confirmed').pipe(
          map((loans) => shippingSummary(loans, today, this.locale)),
        );
      case 'returns':
        return this.api.returns().pipe(map((legs) => returnsSummary(legs, this.locale)));
      case 'buyer-visits':
        return this.api
          .visits()
          .pipe(map((visits) => buyerVisitsSummary(visits, today, this.locale)));
      case 'proctor-offers':
        return this.api
          .visits()
          .pipe(
            map((visits) =>
              proctorOffersSummary(visits, this.session.user()?.id ?? null, today, this.locale),
            ),
          );
      case 'arrivals':
        return loansIn().pipe(map((loans) => arrivalsSummary(loans, today, this.locale)));
      case 'outbox':
        return this.api
          .parkedEmails()
          .pipe(map((mails) => outboxSummary(mails, HOME_OUTBOX_LIMIT)));
    }
  }

  protected readonly membersLink = computed(() => {
    const organisation = this.session.activeOrganisation();
    return organisation && this.session.canManageMembers()
      ? `/organisations/${organisation.id}/members`
      : null;
  });
}
