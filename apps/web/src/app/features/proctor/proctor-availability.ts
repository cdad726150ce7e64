import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  inject,
  signal,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import type { AvailabilitySettings } from '@evalon/contracts';
import { ApiError, messageOf } from '../../core/api-error';
import { PageHeader } from '../../shared/page-header/page-header';
import { ProctorApi, type PreviewDay } from './proctor-api';

const whyWords: Partial<Record<string, string>> = {
  visit: 'Accepted visit',
  blackout: 'Blackout',
  exception: 'Exception',
  'not-in-pattern': 'Not in your pattern',
};

/**
 * Weekly pattern and exceptions as RFC 5545 recurrence rules in the proctor's zone, blackout
 * days, and the next 8 weeks as the candidate search reads them.
 */
@Component({
  selector: 'ev-proctor-availability',
  imports: [FormsModule, MatButtonModule, MatCardModule, MatIconModule, PageHeader, RouterLink],
  template: `
    <a mat-button routerLink="/proctor"><mat-icon>arrow_back</mat-icon> Visit offers</a>
    <ev-page-header
      heading="Availability"
      [subtitle]="
        'Rules are read in your home zone' +
        (zone() ? ' (' + zone() + ')' : '') +
        '; one rule per box, a DTSTART line and an RRULE line.'
      "
    />
    <mat-card appearance="outlined">
      <h2>Weekly pattern</h2>
      @for (rule of rules(); track $index; let i = $index) {
        <div class="rule">
          <textarea
            rows="2"
            [ngModel]="rule"
            (ngModelChange)="setRule(i, $event)"
            [attr.aria-label]="'Rule ' + (i + 1)"
          ></textarea>
          <button mat-icon-button type="button" (click)="removeRule(i)" aria-label="Remove rule">
            <mat-icon>delete</mat-icon>
          </button>
          @if (fieldErrors()['rules.' + i]; as e) {
            <p class="error">{{ e }}</p>
          }
        </div>
      }
      <button mat-button type="button" (click)="addRule()">
        <mat-icon>add</mat-icon> Add a rule
      </button>
      <h2>Exceptions</h2>
      <p class="hint">
        Days taken out of the pattern, one-off extra days you can work, and recurring exceptions (a
        DTSTART and an RRULE line). Exceptions win over extra days, as in RFC 5545.
      </p>
      @for (e of exceptions(); track $index; let i = $index) {
        <div class="exception" [attr.data-kind]="e.kind">
          @if (e.kind === 'rule') {
            <textarea
              rows="2"
              [ngModel]="e.rule"
              (ngModelChange)="setException(i, $event)"
              [attr.aria-label]="'Exception rule ' + (i + 1)"
            ></textarea>
          } @else {
            <span class="kind">{{ e.kind === 'extra' ? 'Extra day' : 'Day off' }}</span>
            <input
              type="date"
              [ngModel]="e.date"
              (ngModelChange)="setException(i, $event)"
              [attr.aria-label]="(e.kind === 'extra' ? 'Extra day ' : 'Day off ') + (i + 1)"
            />
          }
          <button
            mat-icon-button
            type="button"
            (click)="removeException(i)"
            [attr.aria-label]="'Remove exception ' + (i + 1)"
          >
            <mat-icon>delete</mat-icon>
          </button>
          @if (exceptionError(i); as e) {
            <p class="error">{{ e }}</p>
          }
        </div>
      }
      <div class="adders">
        <button mat-button type="button" (click)="addException('date')">
          <mat-icon>event_busy</mat-icon> Add a day off
        </button>
        <button mat-button type="button" (click)="addException('extra')">
          <mat-icon>event_available</mat-icon> Add an extra day
        </button>
        <button mat-button type="button" (click)="addException('rule')">
          <mat-icon>event_repeat</mat-icon> Add a recurring exception
        </button>
      </div>
      <h2>Blackout days</h2>
      @for (b of blackouts(); track $index; let i = $index) {
        <div class="blackout">
          <input
            type="date"
            [ngModel]="b.from"
            (ngModelChange)="setBlackout(i, 'from', $event)"
            aria-label="From"
          />
          <input
            type="date"
            [ngModel]="b.to"
            (ngModelChange)="setBlackout(i, 'to', $event)"
            aria-label="To"
          />
          <button
            mat-icon-button
            type="button"
            (click)="removeBlackout(i)"
            aria-label="Remove blackout"
          >
            <mat-icon>delete</mat-icon>
          </button>
          @if (fieldErrors()['blackouts.' + i + '.to']; as e) {
            <p class="error">{{ e }}</p>
          }
        </div>
      }
      <button mat-button type="button" (click)="addBlackout()">
        <mat-icon>add</mat-icon> Add blackout days
      </button>
      <p class="status" role="status">{{ status() }}</p>
      <button mat-flat-button type="button" (click)="save()" [disabled]="busy()">
        <mat-icon>save</mat-icon> Save availability
      </button>
    </mat-card>
    <mat-card appearance="outlined">
      <h2>The next 8 weeks</h2>
      <div class="weeks" role="grid" aria-label="Next 8 weeks">
        @for (w of weekdays; track w) {
          <span class="weekday" aria-hidden="true">{{ w }}</span>
        }
        @for (pad of padding(); track $index) {
          <span aria-hidden="true"></span>
        }
        @for (d of preview(); track d.date) {
          <span
            class="day"
            role="gridcell"
            [class.on]="d.available"
            [attr.data-why]="d.why"
            [title]="d.date + ': ' + (d.available ? 'available' : (why[d.why ?? ''] ?? d.why))"
          >
            {{ d.date.slice(8) }}
          </span>
        }
      </div>
      <p class="legend">
        <span class="day on">1</span> available <span class="day" data-why="visit">1</span> accepted
        visit <span class="day" data-why="exception">1</span> day off
        <span class="day" data-why="blackout">1</span> blackout <span class="day">1</span> not in
        your pattern
      </p>
    </mat-card>
  `,
  styles: `
    :host {
      display: grid;
      gap: 16px;
    }
    :host > a {
      justify-self: start;
    }
    mat-card {
      padding: 16px 24px;
    }
    .rule {
      display: grid;
      grid-template-columns: 1fr auto;
      gap: 8px;
      margin-bottom: 8px;
    }
    .rule textarea {
      font-family: monospace;
      padding: 8px;
      border-radius: 8px;
      border: 1px solid var(--mat-sys-outline);
    }
    .blackout,
    .exception {
      display: flex;
      flex-wrap: wrap;
      gap: 8px;
      align-items: center;
      margin-bottom: 4px;
    }
    .exception textarea {
      flex: 1;
      font-family: monospace;
      padding: 8px;
      border-radius: 8px;
      border: 1px solid var(--mat-sys-outline);
    }
    .exception .kind {
      min-width: 6rem;
      font: var(--mat-sys-label-large);
    }
    .exception[data-kind='extra'] .kind {
      color: var(--mat-sys-primary);
    }
    .exception .error,
    .blackout .error {
      flex-basis: 100%;
    }
    .hint {
      color: var(--mat-sys-on-surface-variant);
      margin: 0 0 8px;
    }
    .adders {
      display: flex;
      flex-wrap: wrap;
      gap: 4px;
    }
    .day[data-why='exception'] {
      background: var(--mat-sys-surface-container-highest);
      text-decoration: line-through;
    }
    .day[data-why='blackout'] {
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
    .error {
      color: var(--mat-sys-error);
      grid-column: 1 / -1;
      margin: 0;
    }
    .status {
      min-height: 1px;
      color: var(--mat-sys-on-surface-variant);
    }
    .weeks {
      display: grid;
      grid-template-columns: repeat(7, 2.5rem);
      gap: 4px;
    }
    .day {
      display: inline-grid;
      place-items: center;
      width: 2.5rem;
      height: 2rem;
      border-radius: 8px;
      background: var(--mat-sys-surface-container-high);
      color: var(--mat-sys-on-surface-variant);
    }
    .day.on {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
      font-weight: 600;
    }
    .day[data-why='visit'] {
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    .weekday {
      text-align: center;
      font: var(--mat-sys-label-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .legend {
      display: flex;
      gap: 8px;
      align-items: center;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProctorAvailability {
  private readonly api = inject(ProctorApi);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly why = whyWords;
  protected readonly rules = signal<string[]>([]);
  protected readonly blackouts = signal<{ from: string; to: string }[]>([]);
  protected readonly exceptions = signal<AvailabilitySettings['exceptions']>([]);
  protected readonly preview = signal<PreviewDay[]>([]);
  protected readonly zone = signal('');
  protected readonly busy = signal(false);
  protected readonly status = signal('');
  protected readonly fieldErrors = signal<Readonly<Record<string, string>>>({});
  protected readonly hasRules = computed(() => this.rules().length > 0);
  protected readonly weekdays = ['Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat', 'Sun'];
  /** Empty cells before the first day, so each column is one weekday (Monday first). */
  protected readonly padding = computed(() => {
    const first = this.preview()[0]?.date;
    if (!first) return [];
    const weekday = new Date(`${first}T12:00:00Z`).getUTCDay(); // 0 = Sunday
    return Array.from({ length: (weekday + 6) % 7 });
  });

  constructor() {
    this.api
      .profile()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((p) => {
        if (!p) return;
        this.zone.set(p.homeTimeZone);
        this.rules.set(p.availability.rules);
        this.blackouts.set(p.availability.blackouts);
        this.exceptions.set(p.availability.exceptions);
      });
    this.loadPreview();
  }

  private loadPreview(): void {
    this.api
      .preview()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({ next: (p) => this.preview.set(p.days), error: () => this.preview.set([]) });
  }

  protected setRule(i: number, value: string): void {
    this.rules.update((r) => r.map((x, j) => (j === i ? value : x)));
  }
  protected addRule(): void {
    const zone = this.zone() || 'UTC';
    this.rules.update((r) => [
      ...r,
      `DTSTART;TZID=${zone}:20270104T080000\nRRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE`,
    ]);
  }
  protected removeRule(i: number): void {
    this.rules.update((r) => r.filter((_, j) => j !== i));
  }
  protected setBlackout(i: number, key: 'from' | 'to', value: string): void {
    this.blackouts.update((b) => b.map((x, j) => (j === i ? { ...x, [key]: value } : x)));
  }
  protected addBlackout(): void {
    this.blackouts.update((b) => [...b, { from: '', to: '' }]);
  }
  /** The server's (or the form's) message for exception `i`, if any. */
  protected exceptionError(i: number): string | null {
    const errors: Readonly<Record<string, string | undefined>> = this.fieldErrors();
    return errors[`exceptions.${i}.date`] ?? errors[`exceptions.${i}.rule`] ?? null;
  }
  protected setException(i: number, value: string): void {
    this.exceptions.update((list) =>
      list.map((e, j) =>
        j !== i ? e : e.kind === 'rule' ? { ...e, rule: value } : { ...e, date: value },
      ),
    );
  }
  protected addException(kind: 'date' | 'extra' | 'rule'): void {
    const zone = this.zone() || 'UTC';
    this.exceptions.update((list) => [
      ...list,
      kind === 'rule'
        ? { kind, rule: `DTSTART;TZID=${zone}:20270108T000000\nRRULE:FREQ=WEEKLY;INTERVAL=2` }
        : { kind, date: '' },
    ]);
  }
  protected removeException(i: number): void {
    this.exceptions.update((list) => list.filter((_, j) => j !== i));
  }
  protected removeBlackout(i: number): void {
    this.blackouts.update((b) => b.filter((_, j) => j !== i));
  }

  protected save(): void {
    // Half-filled rows are named here rather than dropped: the person meant something by them.
    const missing: Record<string, string> = {};
    this.exceptions().forEach((e, i) => {
      if (e.kind !== 'rule' && !e.date) missing[`exceptions.${i}.date`] = 'Choose the day.';
    });
    this.blackouts().forEach((b, i) => {
      if (!b.from || !b.to) missing[`blackouts.${i}.to`] = 'Choose the first and the last day.';
    });
    if (Object.keys(missing).length) {
      this.fieldErrors.set(missing);
      this.status.set('Some days are missing; nothing was saved.');
      return;
    }
    this.busy.set(true);
    this.fieldErrors.set({});
    this.api
      .saveAvailability({
        rules: this.rules(),
        exceptions: this.exceptions(),
        blackouts: this.blackouts(),
      })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => {
          this.busy.set(false);
          this.status.set('Saved.');
          this.loadPreview();
        },
        error: (e: unknown) => {
          this.busy.set(false);
          if (e instanceof ApiError) this.fieldErrors.set(e.fieldErrors);
          this.status.set(messageOf(e));
        },
      });
  }
}
