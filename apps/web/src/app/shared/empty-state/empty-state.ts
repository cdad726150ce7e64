import { ChangeDetectionStrategy, Component, booleanAttribute, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** What a list or page shows when there is nothing in it yet (or it failed to load). */
@Component({
  selector: 'ev-empty-state',
  imports: [MatIconModule],
  template: `
    @if (icon(); as icon) {
      <span class="icon" aria-hidden="true"
        ><mat-icon>{{ icon }}</mat-icon></span
      >
    }
    <div class="text">
      <p class="heading" [attr.role]="tone() === 'error' ? 'alert' : null">{{ heading() }}</p>
      @if (message()) {
        <p class="message">{{ message() }}</p>
      }
      <div class="actions"><ng-content /></div>
    </div>
  `,
  styleUrl: './empty-state.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    '[class.compact]': 'compact()',
    '[class.error]': "tone() === 'error'",
  },
})
export class EmptyState {
  /** Material Symbols ligature; null for none (e.g. inside a card that has its own). */
  readonly icon = input<string | null>('inbox');
  /** The one-line situation, e.g. "No shipments to pack today". */
  readonly heading = input.required<string>();
  /** What to do about it. */
  readonly message = input<string | null>(null);
  /** Whether to use the small, left-aligned layout for cards. */
  readonly compact = input(false, { transform: booleanAttribute });
  /** `error` when the state explains a failure. */
  readonly tone = input<'neutral' | 'error'>('neutral');
}
