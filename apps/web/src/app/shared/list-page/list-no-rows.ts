import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import type { ListQuery } from './list-query';
import type { ListLoadState } from './list-source';

/**
 * The row a list's table shows when the page has no rows: "Loading…" before the first answer,
 * else what the search or filters left out, with a button that clears them. Use on the table's
 * `*matNoDataRow` row: `<tr ev-list-no-rows *matNoDataRow ...>`.
 */
@Component({
  // An attribute on the row itself: a custom element inside a table is moved out by the parser.
  // eslint-disable-next-line @angular-eslint/component-selector
  selector: 'tr[ev-list-no-rows]',
  imports: [MatButtonModule],
  template: `
    <td [attr.colspan]="columns()">
      @if (!source().loaded()) {
        {{ loadingText() }}
      } @else if (query().narrowed()) {
        {{ noMatchText() }}
        @if (clearLabel(); as clear) {
          <button mat-button type="button" (click)="query().clear()">{{ clear }}</button>
        }
      }
    </td>
  `,
  styles: `
    td {
      padding: 32px 16px;
      text-align: center;
      font: var(--mat-sys-body-medium);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ListNoRows {
  readonly query = input.required<ListQuery<string, string>>();
  readonly source = input.required<ListLoadState>();
  /** How many columns the cell spans. */
  readonly columns = input.required<number>();
  /** e.g. "Loading units…". */
  readonly loadingText = input.required<string>();
  /** e.g. "No unit matches these filters." */
  readonly noMatchText = input.required<string>();
  /** Label of the button that clears search and filters; null for none. */
  readonly clearLabel = input<string | null>('Clear filters');
}
