import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { EmptyState } from '../empty-state/empty-state';
import type { ListQuery } from './list-query';
import type { ListLoadState } from './list-source';

/**
 * The states around a list page's table: a loading bar in a fixed slot (so the page does not
 * jump), the error with "Try again", and the page's own empty state (its content) when there is
 * nothing at all yet. `hidesTable` says when the table itself should make way.
 */
@Component({
  selector: 'ev-list-status',
  imports: [EmptyState, MatButtonModule, MatIconModule, MatProgressBarModule],
  template: `
    <div class="progress-slot">
      @if (source().loading()) {
        <mat-progress-bar mode="indeterminate" [attr.aria-label]="loadingLabel()" />
      }
    </div>
    @if (source().error(); as message) {
      <ev-empty-state tone="error" icon="cloud_off" [heading]="errorHeading()" [message]="message">
        <button mat-stroked-button type="button" (click)="source().reload()">
          <mat-icon>refresh</mat-icon>
          Try again
        </button>
      </ev-empty-state>
    } @else if (empty()) {
      <ng-content />
    }
  `,
  styles: `
    :host {
      display: block;
    }
    .progress-slot {
      height: 4px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ListStatus {
  readonly query = input.required<ListQuery<string, string>>();
  readonly source = input.required<ListLoadState>();
  /** Accessible name of the loading bar, e.g. "Loading units". */
  readonly loadingLabel = input.required<string>();
  /** Heading of the error state, e.g. "Units couldn’t be loaded". */
  readonly errorHeading = input.required<string>();

  /** Whether there is nothing at all (not merely nothing matching a search or filter). */
  protected readonly empty = computed(
    () => this.source().loaded() && this.source().total() === 0 && !this.query().narrowed(),
  );

  /** Whether the error or the empty state stands in for the table. */
  readonly hidesTable = computed(() => !!this.source().error() || this.empty());
}
