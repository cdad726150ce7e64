import { DOCUMENT, Injectable, inject } from '@angular/core';

/**
 * Leaves the app for another site (the payment provider's hosted page). A service rather than
 * `window.location` in components, so tests replace it and assert where the page would go
 * without navigating the test runner away.
 */
@Injectable({ providedIn: 'root' })
export class ExternalNavigation {
  private readonly document = inject(DOCUMENT);

  /** Opens `url` in this tab, keeping this page in the history so Back returns here. */
  assign(url: string): void {
    this.document.defaultView?.location.assign(url);
  }
}
