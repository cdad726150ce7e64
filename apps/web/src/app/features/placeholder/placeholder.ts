import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { PageHeader } from '../../shared/page-header/page-header';

/**
 * Stands in for a page that is planned but not built yet, and says what it will do. Inputs come
 * from the route's `data` (component input binding).
 */
@Component({
  selector: 'ev-placeholder',
  imports: [EmptyState, MatButtonModule, MatCardModule, MatIconModule, PageHeader, RouterLink],
  template: `
    <ev-page-header [heading]="heading()" />
    <mat-card appearance="outlined">
      <ev-empty-state [icon]="icon()" heading="Coming soon in Evalon" [message]="summary()">
        <a mat-stroked-button routerLink="/">
          <mat-icon>home</mat-icon>
          Back to home
        </a>
      </ev-empty-state>
    </mat-card>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Placeholder {
  /** Page title. */
  readonly heading = input('Coming soon');
  /** What the page will let people do. */
  readonly summary = input('');
  /** Material Symbols ligature for the page. */
  readonly icon = input('construction');
}
