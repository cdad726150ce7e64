import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { pageSizeOptions } from '@evalon/contracts/values';
import type { ListQuery } from './list-query';
import type { ListLoadState } from './list-source';

/** A list page's paginator: the page and its size live in the URL, the count comes from the server. */
@Component({
  selector: 'ev-list-paginator',
  imports: [MatPaginatorModule],
  template: `
    <mat-paginator
      [length]="source().total()"
      [pageIndex]="query().request().page"
      [pageSize]="query().request().size"
      [pageSizeOptions]="sizes"
      [attr.aria-label]="label()"
      (page)="changed($event)"
    />
  `,
  styles: `
    :host {
      display: block;
      border-top: 1px solid var(--mat-sys-outline-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ListPaginator {
  readonly query = input.required<ListQuery<string, string>>();
  readonly source = input.required<ListLoadState>();
  /** Accessible name, e.g. "Pages of units". */
  readonly label = input.required<string>();

  protected readonly sizes = [...pageSizeOptions];

  protected changed(event: PageEvent): void {
    this.query().setPage(event.pageIndex, event.pageSize);
  }
}
