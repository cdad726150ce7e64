import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** The frame of the signed-out pages: a short word about Evalon beside the form. */
@Component({
  selector: 'ev-auth-frame',
  imports: [MatIconModule],
  templateUrl: './auth-frame.html',
  styleUrl: './auth-frame.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AuthFrame {
  /** The page's `h1`. */
  readonly heading = input.required<string>();
  /** A line under the heading. */
  readonly lead = input<string | null>(null);
}
