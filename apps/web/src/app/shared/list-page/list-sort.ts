import {
  Directive,
  ElementRef,
  HostAttributeToken,
  TrackByFunction,
  afterNextRender,
  effect,
  inject,
  input,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatSort, MatSortHeader } from '@angular/material/sort';
import { MatTable } from '@angular/material/table';
import type { ListPage } from './list-page';

/**
 * Connects a list page's `mat-table` to its list: `matSort` kept in step with the order in the
 * URL (a click on a sort header changes the URL; the URL, from a reload, a shared link or Back,
 * sets the arrows), and rows tracked by their id so a reload keeps their DOM.
 */
@Directive({
  selector: 'table[evList]',
  hostDirectives: [MatSort],
})
export class ListTable {
  /** The list the table shows. */
  readonly evList = input.required<ListPage>();

  constructor() {
    const sort = inject(MatSort);
    const table = inject(MatTable);
    effect(() => {
      const { query, source } = this.evList();
      table.trackBy = source.trackBy as TrackByFunction<unknown>;
      const order = query.order();
      if (sort.active === order.field && sort.direction === order.dir) return;
      sort.active = order.field;
      sort.direction = order.dir;
      // What MatSort does when its inputs change: tell the headers to redraw their arrows.
      sort._stateChanges.next();
    });
    sort.sortChange
      .pipe(takeUntilDestroyed())
      .subscribe((change) => this.evList().query.setSort(change.active, change.direction));
  }
}

/**
 * A sort header's words for screen readers, "Sort by <its label>", and `evSortHeader="end"` for
 * number columns: the arrow before the label, the text at the end.
 */
@Directive({ selector: 'th[evSortHeader]' })
export class SortHeaderWords {
  constructor() {
    const header = inject(MatSortHeader);
    const element: HTMLElement = inject(ElementRef).nativeElement;
    // A static attribute, read once: number columns put the arrow before the label.
    if (inject(new HostAttributeToken('evSortHeader'), { optional: true }) === 'end') {
      header.arrowPosition = 'before';
      element.classList.add('number');
    }
    afterNextRender(() => {
      header.sortActionDescription = `Sort by ${element.textContent?.trim().toLocaleLowerCase()}`;
    });
  }
}
