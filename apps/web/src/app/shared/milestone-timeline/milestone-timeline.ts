import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  computed,
  inject,
  input,
} from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { LoanState, Milestones } from '@evalon/contracts';
import { IsoDate, describeZone, formatDay } from '../iso-date';

/** One of the seven milestones of a loan. */
export type MilestoneKey = keyof Milestones;

/** Whose calendar a milestone's day is in. */
type Place = 'depot' | 'campus';

interface StepDefinition {
  readonly key: MilestoneKey;
  readonly label: string;
  readonly icon: string;
  readonly place: Place;
}

/** The milestones in the order they happen, with our words for them. */
export const milestoneSteps: readonly StepDefinition[] = [
  { key: 'shipBy', label: 'Ship by', icon: 'outbox', place: 'depot' },
  { key: 'deliverBy', label: 'Arrives by', icon: 'local_shipping', place: 'campus' },
  { key: 'useFrom', label: 'First case', icon: 'play_circle', place: 'campus' },
  { key: 'useTo', label: 'Last case', icon: 'stop_circle', place: 'campus' },
  { key: 'returnShipBy', label: 'Ships back by', icon: 'undo', place: 'campus' },
  { key: 'backAtDepot', label: 'Back at depot', icon: 'warehouse', place: 'depot' },
  { key: 'readyAgain', label: 'Ready again', icon: 'task_alt', place: 'depot' },
];

/** Where a loan stands on its timeline. */
export interface TimelineProgress {
  /** The milestone the loan is working towards, or null when none (finished or stopped). */
  readonly current: MilestoneKey | null;
  /** Whether every milestone is behind it. */
  readonly complete: boolean;
}

/**
 * The milestone a loan in `state` is working towards on `today` (campus calendar). The state
 * says where the unit physically is (it cannot have arrived before it shipped); within the stay
 * at the hospital the dates decide between waiting for the first case, cases under way and
 * getting ready to send it back. Stopped loans (declined, cancelled, expired) have none.
 */
export function loanProgress(
  state: LoanState,
  milestones: Milestones,
  today: IsoDate,
): TimelineProgress {
  switch (state) {
    case 'requested':
    case 'approved':
    case 'confirmed':
      return { current: 'shipBy', complete: false };
    case 'shipped':
      return { current: 'deliverBy', complete: false };
    case 'delivered':
      if (today < milestones.useFrom) return { current: 'useFrom', complete: false };
      if (today <= milestones.useTo) return { current: 'useTo', complete: false };
      return { current: 'returnShipBy', complete: false };
    case 'returning':
      return { current: 'backAtDepot', complete: false };
    case 'returned':
      return { current: 'readyAgain', complete: false };
    case 'closed':
      return { current: null, complete: true };
    default:
      return { current: null, complete: false };
  }
}

/** A site whose calendar some milestones are in. */
export interface TimelineSite {
  readonly name: string;
  readonly timeZone: string;
}

/**
 * A loan's seven milestones from "Ship by" to "Ready again", each a calendar day in its site's
 * zone, with the step the loan is working towards highlighted. Horizontal on wide screens,
 * vertical on narrow ones and when `vertical` is set.
 */
@Component({
  selector: 'ev-milestone-timeline',
  imports: [MatIconModule],
  template: `
    <ol class="steps" [attr.aria-label]="label()">
      @for (step of steps(); track step.key) {
        <li
          class="step"
          [class]="'step ' + step.status"
          [attr.aria-current]="step.status === 'current' ? 'step' : null"
          [attr.data-milestone]="step.key"
        >
          <span class="marker" aria-hidden="true">
            <mat-icon>{{ step.status === 'done' ? 'check' : step.icon }}</mat-icon>
          </span>
          <span class="text">
            <span class="step-label">{{ step.label }}</span>
            <time class="date" [attr.datetime]="step.date">{{ step.dateText }}</time>
            @if (showPlaces()) {
              <span class="place">{{ step.placeText }}</span>
            }
            <span class="cdk-visually-hidden">{{ step.statusText }}</span>
          </span>
        </li>
      }
    </ol>
    @if (zoneNote(); as note) {
      <p class="zones">{{ note }}</p>
    }
  `,
  styleUrl: './milestone-timeline.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    '[class.vertical]': 'vertical()',
    '[class.stopped]': 'stopped()',
  },
})
export class MilestoneTimeline {
  private readonly locale = inject(LOCALE_ID);

  /** The seven dates. */
  readonly milestones = input.required<Milestones>();
  /** The hospital campus (its calendar holds arrival, cases and the return shipment). */
  readonly campus = input<TimelineSite | null>(null);
  /** The lender's depot (its calendar holds shipping out, coming back and ready again). */
  readonly depot = input<TimelineSite | null>(null);
  /** The milestone being worked towards (highlighted), or null for a plan or a finished loan. */
  readonly current = input<MilestoneKey | null>(null);
  /** Whether every milestone is behind the loan. */
  readonly complete = input(false);
  /** Whether the loan stopped (declined, cancelled, expired): dates are shown muted. */
  readonly stopped = input(false);
  /** Whether to stack the steps top to bottom whatever the width. */
  readonly vertical = input(false);
  /** Whether each step names the site whose calendar its date is in. */
  readonly showPlaces = input(true);
  /** The list's accessible name. */
  readonly label = input('Milestones');

  protected readonly steps = computed(() => {
    const milestones = this.milestones();
    const current = this.current();
    const currentIndex = current ? milestoneSteps.findIndex((s) => s.key === current) : -1;
    const complete = this.complete();
    const campus = this.campus();
    const depot = this.depot();
    return milestoneSteps.map((step, index) => {
      const status = complete
        ? 'done'
        : currentIndex < 0
          ? 'upcoming'
          : index < currentIndex
            ? 'done'
            : index === currentIndex
              ? 'current'
              : 'upcoming';
      const site = step.place === 'depot' ? depot : campus;
      return {
        ...step,
        status,
        statusText: status === 'done' ? '(done)' : status === 'current' ? '(next step)' : '',
        date: milestones[step.key],
        dateText: formatDay(milestones[step.key], 'medium', this.locale),
        placeText: site ? site.name : step.place === 'depot' ? 'Lender’s depot' : 'Your campus',
      };
    });
  });

  /** Names the zones the days are in, e.g. "Days at Velmora East Campus are in …". */
  protected readonly zoneNote = computed(() => {
    const campus = this.campus();
    const depot = this.depot();
    const on = this.milestones().useFrom;
    if (campus && depot && campus.timeZone !== depot.timeZone) {
      return (
        `Campus days are in ${describeZone(campus.timeZone, on, this.locale)}; ` +
        `depot days in ${describeZone(depot.timeZone, on, this.locale)}.`
      );
    }
    const site = campus ?? depot;
    return site ? `Days are in ${describeZone(site.timeZone, on, this.locale)}.` : null;
  });
}
