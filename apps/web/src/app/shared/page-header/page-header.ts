import { ChangeDetectionStrategy, Component, input } from '@angular/core';

/** The title block at the top of a page, with room for actions on the right. */
@Component({
  selector: 'ev-page-header',
  template: `
    <div class="text">
      @if (eyebrow()) {
        <p class="eyebrow">{{ eyebrow() }}</p>
      }
      <h1>{{ heading() }}</h1>
      @if (subtitle()) {
        <p class="subtitle">{{ subtitle() }}</p>
      }
    </div>
    <div class="actions"><ng-content /></div>
  `,
  styleUrl: './page-header.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PageHeader {
  /** The page's one `h1`. */
  readonly heading = input.required<string>();
  /** A line under the heading. */
  readonly subtitle = input<string | null>(null);
  /** A small line above the heading (e.g. the organisation). */
  readonly eyebrow = input<string | null>(null);
}
