import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  inject,
  signal,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { Visit } from '@evalon/contracts';
import { forkJoin } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { addDays, todayIn } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { VisitApi } from '../visits/visit-api';
import { ProctorApi, type PreviewDay } from './proctor-api';

/** Visit states that hold the proctor's days. */
const heldStates: readonly string[] = ['accepted', 'completed', 'signed_off'];

/** One cell of the month grid. */
export interface CalendarDay {
  readonly date: string;
  readonly day: number;
  /** Whether the day belongs to the shown month (leading/trailing days are blank). */
  readonly inMonth: boolean;
  readonly isToday: boolean;
  /** Whether the weekly pattern, exceptions and blackouts make the day available. */
  readonly available: boolean;
  /** The visit on that day, as a case day or a travel day. */
  readonly visit: { id: number; reference: string; siteName: string } | null;
  readonly travel: boolean;
  /** Words for screen readers and the tooltip. */
  readonly label: string;
}

/** `YYYY-MM` moved by `delta` months. */
export function shiftMonth(month: string, delta: number): string {
  const [y, m] = month.split('-').map(Number) as [number, number];
  const index = y * 12 + (m - 1) + delta;
  return `${Math.floor(index / 12)}-${String((index % 12) + 1).padStart(2, '0')}`;
}

/**
 * Builds Monday-first weeks of `month`. Travel days are the days of a visit's footprint
 * (`busyFrom`–`busyTo`, computed by the matching package when the proctor accepted) outside its
 * case days; they are read, never recomputed here.
 */
export function monthGrid(
  month: string,
  today: string,
  availability: readonly PreviewDay[],
  visits: readonly Visit[],
): CalendarDay[][] {
  const first = `${month}-01`;
  const weekday = (new Date(`${first}T12:00:00Z`).getUTCDay() + 6) % 7; // Monday = 0
  const start = addDays(first, -weekday);
  const available = new Map(availability.map((d) => [d.date, d]));
  const weeks: CalendarDay[][] = [];
  let date = start;
  do {
    const week: CalendarDay[] = [];
    for (let i = 0; i < 7; i++) {
      const inMonth = date.startsWith(month);
      const visit = visits.find(
        (v) => (v.busyFrom ?? v.from) <= date && date <= (v.busyTo ?? v.to),
      );
      const travel = !!visit && (date < visit.from || date > visit.to);
      const free = available.get(date)?.available ?? false;
      const parts = [
        date,
        visit
          ? `${travel ? 'travel day for' : 'visit'} ${visit.reference} at ${visit.siteName}`
          : free
            ? 'available'
            : 'outside your availability',
        ...(date === today ? ['today'] : []),
      ];
      week.push({
        date,
        day: Number(date.slice(8)),
        inMonth,
        isToday: date === today,
        available: free,
        visit: visit
          ? { id: visit.id, reference: visit.reference, siteName: visit.siteName }
          : null,
        travel,
        label: parts.join(', '),
      });
      date = addDays(date, 1);
    }
    weeks.push(week);
  } while (date.startsWith(month));
  return weeks;
}

/**
 * The proctor's month: accepted and completed visits with their travel days, days outside their
 * availability shaded, today marked. Previous/next month by button or Page Up/Page Down.
 */
@Component({
  selector: 'ev-proctor-calendar',
  imports: [
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './proctor-calendar.html',
  styleUrl: './proctor-calendar.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { '(keydown.pageup)': 'move(-1, $event)', '(keydown.pagedown)': 'move(1, $event)' },
})
export class ProctorCalendar {
  private readonly proctors = inject(ProctorApi);
  private readonly visitsApi = inject(VisitApi);
  private readonly session = inject(SessionStore);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly weekdays = ['Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat', 'Sun'];
  protected readonly zone = signal<string | null>(null);
  protected readonly today = computed(() => todayIn(this.zone() ?? this.session.timeZone()));
  protected readonly month = signal(todayIn(this.session.timeZone()).slice(0, 7));
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  private readonly days = signal<PreviewDay[]>([]);
  private readonly visits = signal<Visit[]>([]);

  protected readonly title = computed(() =>
    new Date(`${this.month()}-15T12:00:00Z`).toLocaleDateString('en-GB', {
      month: 'long',
      year: 'numeric',
      timeZone: 'UTC',
    }),
  );
  protected readonly weeks = computed(() =>
    monthGrid(this.month(), this.today(), this.days(), this.visits()),
  );
  /** Visits with a day in the month shown, for the list under the grid. */
  protected readonly monthVisits = computed(() =>
    this.visits().filter(
      (v) =>
        (v.busyFrom ?? v.from).slice(0, 7) <= this.month() &&
        this.month() <= (v.busyTo ?? v.to).slice(0, 7),
    ),
  );

  constructor() {
    this.load();
  }

  protected move(delta: number, event?: Event): void {
    event?.preventDefault();
    this.month.update((m) => shiftMonth(m, delta));
    this.load();
  }

  protected load(): void {
    this.loading.set(true);
    this.loadError.set(null);
    const me = this.session.user()?.id;
    forkJoin({
      availability: this.proctors.month(this.month()),
      visits: this.visitsApi.list({ role: 'proctor' }),
    })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: ({ availability, visits }) => {
          this.zone.set(availability.timeZone);
          this.days.set(availability.days);
          this.visits.set(visits.filter((v) => v.proctorId === me && heldStates.includes(v.state)));
          this.loading.set(false);
        },
        error: (e: unknown) => {
          this.loadError.set(messageOf(e));
          this.loading.set(false);
        },
      });
  }
}
