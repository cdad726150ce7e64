import { ChangeDetectionStrategy, Component, booleanAttribute, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** Colour role of a pill, from the theme's container colours. */
export type PillTone = 'primary' | 'secondary' | 'tertiary' | 'neutral' | 'error';

/**
 * A status as a small rounded pill: an optional icon and a short label (the content), in one of
 * the theme's container colours. The one pill look of the app: loan states, unit statuses,
 * payment and agreement states, clash verdicts.
 */
@Component({
  selector: 'ev-status-pill',
  imports: [MatIconModule],
  template: `@if (icon(); as icon) {
      <mat-icon aria-hidden="true">{{ icon }}</mat-icon>
    }
    <span><ng-content /></span>`,
  styles: `
    :host {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      padding: 2px 12px;
      border-radius: var(--mat-sys-corner-full);
      font: var(--mat-sys-label-large);
      white-space: nowrap;
      background: var(--mat-sys-surface-container-highest);
      color: var(--mat-sys-on-surface-variant);
    }
    :host(.with-icon) {
      padding: 4px 12px 4px 8px;
    }
    mat-icon {
      width: 18px;
      height: 18px;
      font-size: 18px;
    }
    :host(.compact) {
      gap: 4px;
      padding: 2px 10px;
      font: var(--mat-sys-label-medium);
    }
    :host(.compact.with-icon) {
      padding: 2px 8px 2px 5px;
    }
    :host(.compact) mat-icon {
      width: 16px;
      height: 16px;
      font-size: 16px;
    }
    :host(.wrap) {
      white-space: normal;
    }
    :host(.primary) {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
    }
    :host(.secondary) {
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
    }
    :host(.tertiary) {
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    :host(.error) {
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    '[class]': 'tone()',
    '[class.with-icon]': '!!icon()',
    '[class.compact]': 'compact()',
    '[class.wrap]': 'wrap()',
  },
})
export class StatusPill {
  /** Colour role; `neutral` for states that ended or are switched off. */
  readonly tone = input<PillTone>('neutral');
  /** Material Symbols ligature shown before the label; null for none. */
  readonly icon = input<string | null>(null);
  /** Whether to use the smaller size, for tables and dense rows. */
  readonly compact = input(false, { transform: booleanAttribute });
  /** Whether a long label may wrap onto a second line. */
  readonly wrap = input(false, { transform: booleanAttribute });
}
