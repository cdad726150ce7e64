import {
  ChangeDetectionStrategy,
  Component,
  booleanAttribute,
  computed,
  input,
} from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { LoanState } from '@evalon/contracts';
import { loanStateLabels } from './loan-rules';

/** How a state reads at a glance. */
type Tone = 'waiting' | 'moving' | 'done' | 'stopped';

const tones: Record<LoanState, { tone: Tone; icon: string }> = {
  requested: { tone: 'waiting', icon: 'hourglass_top' },
  approved: { tone: 'waiting', icon: 'payments' },
  confirmed: { tone: 'moving', icon: 'event_available' },
  shipped: { tone: 'moving', icon: 'local_shipping' },
  delivered: { tone: 'moving', icon: 'home_health' },
  returning: { tone: 'moving', icon: 'undo' },
  returned: { tone: 'moving', icon: 'warehouse' },
  closed: { tone: 'done', icon: 'task_alt' },
  declined: { tone: 'stopped', icon: 'block' },
  cancelled: { tone: 'stopped', icon: 'cancel' },
  expired: { tone: 'stopped', icon: 'timer_off' },
};

/** A loan's state as a small pill with our plain label (`loanStateLabels`). */
@Component({
  selector: 'ev-loan-state-chip',
  imports: [MatIconModule],
  template: `<mat-icon aria-hidden="true">{{ look().icon }}</mat-icon
    ><span>{{ text() }}</span>`,
  styles: `
    :host {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      padding: 4px 12px 4px 8px;
      border-radius: var(--mat-sys-corner-full);
      font: var(--mat-sys-label-large);
      white-space: nowrap;
    }
    mat-icon {
      width: 18px;
      height: 18px;
      font-size: 18px;
    }
    :host(.waiting) {
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    :host(.moving) {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
    }
    :host(.done) {
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
    }
    :host(.compact) {
      gap: 4px;
      padding: 2px 8px 2px 5px;
      font: var(--mat-sys-label-medium);
      white-space: normal;
    }
    :host(.compact) mat-icon {
      width: 16px;
      height: 16px;
      font-size: 16px;
    }
    :host(.stopped) {
      background: var(--mat-sys-surface-container-highest);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { '[class]': 'look().tone', '[class.compact]': 'compact()' },
})
export class LoanStateChip {
  /** The loan's state. */
  readonly state = input.required<LoanState>();
  /** Whether to use the smaller size, for tables. */
  readonly compact = input(false, { transform: booleanAttribute });

  protected readonly look = computed(() => tones[this.state()]);
  protected readonly text = computed(() => loanStateLabels[this.state()]);
}
