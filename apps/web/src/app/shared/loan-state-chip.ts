import {
  ChangeDetectionStrategy,
  Component,
  booleanAttribute,
  computed,
  input,
} from '@angular/core';
import type { LoanState } from '@evalon/contracts';
import { loanStateLabels } from '@evalon/contracts/values';
import { PillTone, StatusPill } from './status-pill/status-pill';

/** How each state reads at a glance: waiting (tertiary), moving (primary), done, stopped. */
const looks: Record<LoanState, { tone: PillTone; icon: string }> = {
  requested: { tone: 'tertiary', icon: 'hourglass_top' },
  approved: { tone: 'tertiary', icon: 'payments' },
  confirmed: { tone: 'primary', icon: 'event_available' },
  shipped: { tone: 'primary', icon: 'local_shipping' },
  delivered: { tone: 'primary', icon: 'home_health' },
  returning: { tone: 'primary', icon: 'undo' },
  returned: { tone: 'primary', icon: 'warehouse' },
  closed: { tone: 'secondary', icon: 'task_alt' },
  declined: { tone: 'neutral', icon: 'block' },
  cancelled: { tone: 'neutral', icon: 'cancel' },
  expired: { tone: 'neutral', icon: 'timer_off' },
};

/** A loan's state as a status pill with our plain label (`loanStateLabels`). */
@Component({
  selector: 'ev-loan-state-chip',
  imports: [StatusPill],
  template: `<ev-status-pill
    [tone]="look().tone"
    [icon]="look().icon"
    [compact]="compact()"
    [wrap]="compact()"
    >{{ text() }}</ev-status-pill
  >`,
  styles: `
    :host {
      display: inline-flex;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoanStateChip {
  /** The loan's state. */
  readonly state = input.required<LoanState>();
  /** Whether to use the smaller size, for tables. */
  readonly compact = input(false, { transform: booleanAttribute });

  protected readonly look = computed(() => looks[this.state()]);
  protected readonly text = computed(() => loanStateLabels[this.state()]);
}
