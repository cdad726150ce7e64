import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { EmptyState } from '../../shared/empty-state/empty-state';

/** Shown for addresses Evalon does not know. */
@Component({
  selector: 'ev-not-found',
  imports: [EmptyState, MatButtonModule, MatCardModule, MatIconModule, RouterLink],
  template: `
    <h1 class="cdk-visually-hidden">Page not found</h1>
    <mat-card appearance="outlined">
      <ev-empty-state
        icon="explore_off"
        heading="We couldn’t find that page"
        message="The address may be mistyped, or the page has moved. Everything you can open is in the menu."
      >
        <a mat-flat-button routerLink="/">
          <mat-icon>home</mat-icon>
          Go to home
        </a>
      </ev-empty-state>
    </mat-card>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotFound {}
