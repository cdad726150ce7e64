import { ChangeDetectionStrategy, Component, booleanAttribute, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { NgTemplateOutlet } from '@angular/common';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { EmptyState } from '../empty-state/empty-state';

/**
 * The loading bar of a list, in a slot of fixed height so the page does not jump when it comes
 * and goes. Used by the paged lists' frame and by the pages that load one list at once.
 */
@Component({
  selector: 'ev-loading-bar',
  imports: [MatProgressBarModule],
  template: `
    @if (active()) {
      <mat-progress-bar mode="indeterminate" [attr.aria-label]="label()" />
    }
  `,
  styles: `
    :host {
      display: block;
      height: 4px;
    }
    :host(.spaced) {
      margin-bottom: 12px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { '[class.spaced]': 'spaced()' },
})
export class LoadingBar {
  /** Whether a request is on its way. */
  readonly active = input.required<boolean>();
  /** What is loading, for screen readers ("Loading notifications"). */
  readonly label = input.required<string>();
  /** Whether to keep a gap below the slot (pages without a card frame around the list). */
  readonly spaced = input(false, { transform: booleanAttribute });
}

/**
 * Why a list could not be loaded, with "Try again". `card` puts it in an outlined card of its
 * own (pages whose list has no card frame); inside a frame it stands alone.
 */
@Component({
  selector: 'ev-load-error',
  imports: [EmptyState, MatButtonModule, MatCardModule, MatIconModule, NgTemplateOutlet],
  template: `
    <ng-template #state>
      <ev-empty-state tone="error" icon="cloud_off" [heading]="heading()" [message]="message()">
        <button mat-stroked-button type="button" (click)="retry.emit()">
          <mat-icon>refresh</mat-icon>
          Try again
        </button>
      </ev-empty-state>
    </ng-template>
    @if (card()) {
      <mat-card appearance="outlined"><ng-container [ngTemplateOutlet]="state" /></mat-card>
    } @else {
      <ng-container [ngTemplateOutlet]="state" />
    }
  `,
  styles: `
    @use '@angular/material' as mat;

    :host {
      display: block;
    }
    mat-card {
      @include mat.card-overrides(
        (
          outlined-container-color: var(--mat-sys-surface),
        )
      );
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoadError {
  /** The one-line situation, e.g. "The outbox couldn’t be loaded". */
  readonly heading = input.required<string>();
  /** Why, in words. */
  readonly message = input.required<string>();
  /** Whether to show it in an outlined card of its own. */
  readonly card = input(false, { transform: booleanAttribute });
  /** Emitted when the person asks to load again. */
  readonly retry = output<void>();
}
