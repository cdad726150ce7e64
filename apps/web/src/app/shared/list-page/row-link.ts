import { Directive, inject, input } from '@angular/core';
import { Router } from '@angular/router';

/**
 * Makes a whole table row open its page on click, like the link in its first cell. The link stays
 * the way in for keyboards and screen readers (Tab reaches it, Enter follows it); clicks on the
 * row's own buttons and links keep their meaning.
 */
@Directive({
  selector: 'tr[evRowLink]',
  host: { class: 'ev-row-link', '(click)': 'open($event)' },
})
export class RowLink {
  private readonly router = inject(Router);
  /** Router commands of the row's page, e.g. `['/units', 12]`. */
  readonly evRowLink = input.required<readonly unknown[]>();

  protected open(event: MouseEvent): void {
    const target = event.target as HTMLElement | null;
    if (target?.closest('a, button, input, select, textarea, [role="menuitem"]')) return;
    if (window.getSelection()?.toString()) return; // Selecting text is not a click to open.
    void this.router.navigate([...this.evRowLink()]);
  }
}
