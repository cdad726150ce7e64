import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import type { ListPage } from './list-page';

/**
 * The row a list's table shows when the page has no rows: "Loading…" before the first answer,
 * else what the search or filters left out, with a button that clears them. Use on the table's
 * `*matNoDataRow` row: `<tr ev-list-no-rows *matNoDataRow [list]="list" [columns]="n"></tr>`.
 */
@Component({
  // An attribute on the row itself: a custom element inside a table is moved out by the parser.
  // eslint-disable-next-line @angular-eslint/component-selector
  selector: 'tr[ev-list-no-rows]',
  imports: [MatButtonModule],
  template: `
    <td [attr.colspan]="columns()">
      @if (!list().source.loaded()) {
        {{ list().words.loading }}…
      } @else if (list().query.narrowed()) {
        {{ list().words.noMatch(list().query.request().q) }}
        @if (list().words.clear; as clear) {
          <button mat-button type="button" (click)="list().query.clear()">{{ clear }}</button>
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
  readonly list = input.required<ListPage>();
  /** How many columns the cell spans. */
  readonly columns = input.required<number>();
}
