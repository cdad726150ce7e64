import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { pageSizeOptions } from '@evalon/contracts/values';
import { LoadError, LoadingBar } from './load-state';
import type { ListPage } from './list-page';

/**
 * What surrounds a list page's `mat-table` (projected, and written by the page like any Material
 * table): a loading bar in a fixed slot so the page does not jump, the error with "Try again",
 * the page's own empty state (a projected `ev-empty-state`) when there is nothing at all, the
 * scrolling area, and the paginator, whose page and size live in the URL.
 */
@Component({
  selector: 'ev-list-frame',
  imports: [LoadError, LoadingBar, MatPaginatorModule],
  template: `
    <ev-loading-bar [active]="list().source.loading()" [label]="list().words.loading" />
    @if (list().source.error(); as message) {
      <ev-load-error
        [heading]="list().words.error"
        [message]="message"
        (retry)="list().source.reload()"
      />
    } @else if (empty()) {
      <ng-content select="ev-empty-state" />
    }
    <div class="table-area" [class.hidden]="hidesTable()">
      <div class="table-scroll"><ng-content select="table" /></div>
      <mat-paginator
        [length]="list().source.total()"
        [pageIndex]="list().query.request().page"
        [pageSize]="list().query.request().size"
        [pageSizeOptions]="sizes"
        [attr.aria-label]="list().words.pages"
        (page)="changed($event)"
      />
    </div>
  `,
  styles: `
    :host {
      display: block;
    }
    .table-area.hidden {
      display: none;
    }
    .table-scroll {
      overflow-x: auto;
    }
    mat-paginator {
      border-top: 1px solid var(--mat-sys-outline-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ListFrame {
  /** The list page this frame belongs to. */
  readonly list = input.required<ListPage>();

  protected readonly sizes = [...pageSizeOptions];

  /** Whether there is nothing at all (not merely nothing matching a search or filter). */
  protected readonly empty = computed(() => {
    const { source, query } = this.list();
    return source.loaded() && source.total() === 0 && !query.narrowed();
  });

  /** Whether the error or the empty state stands in for the table. */
  protected readonly hidesTable = computed(() => !!this.list().source.error() || this.empty());

  protected changed(event: PageEvent): void {
    this.list().query.setPage(event.pageIndex, event.pageSize);
  }
}
