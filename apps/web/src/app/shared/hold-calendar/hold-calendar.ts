import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  Injector,
  afterNextRender,
  computed,
  inject,
  input,
  model,
  output,
  signal,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { DateTime, Info } from 'luxon';
import { IsoDate, todayIn } from '../iso-date';

/** A blocked interval on a unit, as the calendar needs it (the API's `Hold` fits). */
export interface CalendarHold {
  readonly id: number | string;
  /** `loan` shows as "Reserved", `maintenance` as "Maintenance". */
  readonly kind: 'loan' | 'maintenance';
  /** First blocked day. */
  readonly start: IsoDate;
  /** Last blocked day (inclusive). */
  readonly end: IsoDate;
  /** What the day's description says about it (e.g. a loan reference, or "Reserved"). */
  readonly label?: string | null;
}

/** A range of days drawn on top of the holds, e.g. the footprint a request would need. */
export interface CalendarRange {
  readonly start: IsoDate;
  /** Last day of the range (inclusive). */
  readonly end: IsoDate;
  /** Legend and description words; "Your dates" when left out. */
  readonly label?: string;
}

/** A day of the grid with what covers it. */
export interface CalendarDay {
  readonly date: IsoDate;
  readonly dayOfMonth: number;
  /** Whether the day belongs to the month shown (the grid also shows neighbouring days). */
  readonly inMonth: boolean;
  readonly isToday: boolean;
  /** Holds covering the day. */
  readonly holds: readonly CalendarHold[];
  /** Whether a loan hold covers the day. */
  readonly reserved: boolean;
  /** Whether a maintenance hold covers the day. */
  readonly maintenance: boolean;
  /** Whether the highlighted range covers the day. */
  readonly highlighted: boolean;
  /** Whether the highlighted range and a hold both cover the day. */
  readonly conflict: boolean;
  /** Full description for assistive technology. */
  readonly description: string;
}

const monthPattern = /^\d{4}-\d{2}$/;

/** The month `YYYY-MM` holding `date` (an ISO date or today). */
export function monthOf(date: IsoDate): string {
  return date.slice(0, 7);
}

/** Whether `day` falls within `start..end`, both included (ISO dates compare as strings). */
function covers(range: { start: IsoDate; end: IsoDate }, day: IsoDate): boolean {
  return range.start <= day && day <= range.end;
}

/**
 * The 6 × 7 days shown for `month`, starting on `firstDayOfWeek` (1 = Monday … 7 = Sunday, as
 * luxon and ISO 8601 number weekdays), each with the holds and highlight covering it.
 */
export function calendarDays(
  month: string,
  holds: readonly CalendarHold[],
  highlight: CalendarRange | null,
  today: IsoDate,
  firstDayOfWeek: number,
  locale = 'en-US',
): CalendarDay[] {
  const first = DateTime.fromISO(`${month}-01`, { zone: 'utc', locale });
  const lead = (first.weekday - firstDayOfWeek + 7) % 7;
  const start = first.minus({ days: lead });
  const days: CalendarDay[] = [];
  const highlightLabel = highlight?.label ?? 'Your dates';
  for (let i = 0; i < 42; i++) {
    const day = start.plus({ days: i });
    const date = day.toISODate()!;
    const covering = holds.filter((h) => covers(h, date));
    const reserved = covering.some((h) => h.kind === 'loan');
    const maintenance = covering.some((h) => h.kind === 'maintenance');
    const highlighted = highlight !== null && covers(highlight, date);
    const name = day.toLocaleString({
      weekday: 'long',
      month: 'long',
      day: 'numeric',
      year: 'numeric',
    });
    const states = covering.map((h) => {
      const kind = h.kind === 'loan' ? 'Reserved' : 'Maintenance';
      return h.label && h.label !== kind ? `${kind} (${h.label})` : kind;
    });
    if (highlighted) states.push(highlightLabel);
    if (!states.length) states.push('Free');
    days.push({
      date,
      dayOfMonth: day.day,
      inMonth: day.month === first.month,
      isToday: date === today,
      holds: covering,
      reserved,
      maintenance,
      highlighted,
      conflict: highlighted && covering.length > 0,
      description: `${name}: ${states.join('; ')}`,
    });
  }
  return days;
}

/** The locale's first day of the week (1 = Monday … 7 = Sunday), Monday when unknown. */
function localeFirstDay(): number {
  try {
    return Info.getStartOfWeek();
  } catch {
    return 1;
  }
}

/**
 * A month of a unit's calendar: days covered by holds are shaded ("Reserved" loans,
 * "Maintenance"), an optional highlighted range (the footprint a request needs) is outlined, and
 * days where the two meet are marked as conflicts. Prev/next buttons and PageUp/PageDown change
 * the month; arrow keys, Home and End move between days (ARIA grid pattern); Enter or Space on a
 * day emits {@link dayActivated}.
 *
 * ```html
 * <ev-hold-calendar [holds]="holds()" [(month)]="month" [highlight]="footprint()" />
 * ```
 */
@Component({
  selector: 'ev-hold-calendar',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './hold-calendar.html',
  styleUrl: './hold-calendar.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HoldCalendar {
  private static nextId = 0;
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly injector = inject(Injector);
  protected readonly headingId = `ev-hold-calendar-${HoldCalendar.nextId++}`;

  /** The unit's holds; any that touch the grid are drawn. */
  readonly holds = input<readonly CalendarHold[]>([]);
  /** The month shown, `YYYY-MM`; two-way, so the buttons move it (`[(month)]`). */
  readonly month = model.required<string>();
  /** A range drawn on top of the holds (e.g. the requested footprint), or null. */
  readonly highlight = input<CalendarRange | null>(null);
  /** Today, for the marker; the browser's today when left out. */
  readonly today = input<IsoDate | null>(null);
  /** First day of the week, 1 = Monday … 7 = Sunday; the locale's when left out. */
  readonly firstDayOfWeek = input<number>(localeFirstDay());
  /** A line under the grid, e.g. whose calendar the days are in. */
  readonly caption = input<string | null>(null);
  /** Whether the holds for the month are still loading. */
  readonly loading = input(false);
  /** The grid's accessible name. */
  readonly label = input('Unit calendar');
  /** A day was chosen with Enter, Space or a click. */
  readonly dayActivated = output<CalendarDay>();

  /** The day that has keyboard focus within the grid (roving tab index). */
  private readonly focusDate = signal<IsoDate | null>(null);

  private readonly safeMonth = computed(() => {
    const month = this.month();
    return monthPattern.test(month) ? month : monthOf(this.todayValue());
  });
  private readonly todayValue = computed(() => this.today() ?? todayIn());

  protected readonly monthTitle = computed(() =>
    DateTime.fromISO(`${this.safeMonth()}-01`, { zone: 'utc', locale: 'en-US' }).toFormat(
      'LLLL yyyy',
    ),
  );
  protected readonly previousTitle = computed(() => this.shiftTitle(-1));
  protected readonly nextTitle = computed(() => this.shiftTitle(1));

  protected readonly weekdays = computed(() => {
    const names = Info.weekdays('long', { locale: 'en-US' });
    const short = Info.weekdays('short', { locale: 'en-US' });
    const first = this.firstDayOfWeek();
    return Array.from({ length: 7 }, (_, i) => {
      const index = (first - 1 + i) % 7;
      return { long: names[index]!, short: short[index]!.slice(0, 2) };
    });
  });

  protected readonly days = computed(() =>
    calendarDays(
      this.safeMonth(),
      this.holds(),
      this.highlight(),
      this.todayValue(),
      this.firstDayOfWeek(),
    ),
  );

  protected readonly weeks = computed(() => {
    const days = this.days();
    return Array.from({ length: 6 }, (_, w) => days.slice(w * 7, w * 7 + 7));
  });

  /** The day that takes Tab: the focused one if shown, else today in this month, else the 1st. */
  protected readonly tabbableDate = computed(() => {
    const month = this.safeMonth();
    const focus = this.focusDate();
    if (focus && monthOf(focus) === month) return focus;
    const today = this.todayValue();
    return monthOf(today) === month ? today : `${month}-01`;
  });

  protected readonly legend = computed(() => {
    const highlight = this.highlight();
    const entries = [
      { kind: 'reserved', label: 'Reserved' },
      { kind: 'maintenance', label: 'Maintenance' },
    ];
    if (highlight) {
      entries.push({ kind: 'highlight', label: highlight.label ?? 'Your dates' });
      entries.push({ kind: 'conflict', label: 'Clash with a hold' });
    }
    return entries;
  });

  /** Moves the shown month by `delta` months. */
  shiftMonth(delta: number): void {
    this.month.set(this.shifted(delta));
  }

  protected onKeydown(event: KeyboardEvent, day: CalendarDay): void {
    // Keys pressed quickly can reach a cell that is about to be replaced (after a month
    // change); the remembered focus is the truth then.
    const from = this.focusDate() ?? day.date;
    const current = DateTime.fromISO(from, { zone: 'utc' });
    let next: DateTime | null = null;
    switch (event.key) {
      case 'ArrowLeft':
        next = current.minus({ days: 1 });
        break;
      case 'ArrowRight':
        next = current.plus({ days: 1 });
        break;
      case 'ArrowUp':
        next = current.minus({ weeks: 1 });
        break;
      case 'ArrowDown':
        next = current.plus({ weeks: 1 });
        break;
      case 'Home':
        next = current.minus({ days: (current.weekday - this.firstDayOfWeek() + 7) % 7 });
        break;
      case 'End':
        next = current.plus({ days: 6 - ((current.weekday - this.firstDayOfWeek() + 7) % 7) });
        break;
      case 'PageUp':
        next = current.minus({ months: 1 });
        break;
      case 'PageDown':
        next = current.plus({ months: 1 });
        break;
      case 'Enter':
      case ' ':
        event.preventDefault();
        this.dayActivated.emit(this.days().find((d) => d.date === from) ?? day);
        return;
      default:
        return;
    }
    event.preventDefault();
    this.moveFocus(next.toISODate()!);
  }

  protected onFocus(day: CalendarDay): void {
    this.focusDate.set(day.date);
  }

  protected activate(day: CalendarDay): void {
    this.focusDate.set(day.date);
    this.dayActivated.emit(day);
  }

  private moveFocus(date: IsoDate): void {
    this.focusDate.set(date);
    if (monthOf(date) !== this.safeMonth()) this.month.set(monthOf(date));
    afterNextRender(
      () => {
        this.host.nativeElement
          .querySelector<HTMLElement>(`[data-date="${date}"][tabindex="0"]`)
          ?.focus();
      },
      { injector: this.injector },
    );
  }

  private shifted(delta: number): string {
    return DateTime.fromISO(`${this.safeMonth()}-01`, { zone: 'utc' })
      .plus({ months: delta })
      .toFormat('yyyy-LL');
  }

  private shiftTitle(delta: number): string {
    return DateTime.fromISO(`${this.shifted(delta)}-01`, { zone: 'utc', locale: 'en-US' }).toFormat(
      'LLLL yyyy',
    );
  }
}
