import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { ReportChart as ReportChartData } from '@evalon/contracts';
import { NgxEchartsDirective } from 'ngx-echarts';

/**
 * One chart of the evaluation report with its text alternative: the summary sentence under it
 * (also the chart's accessible name) and the same numbers as a table behind "Show the numbers".
 */
@Component({
  selector: 'ev-report-chart',
  imports: [NgxEchartsDirective],
  template: `
    @let c = chart();
    <figure>
      <figcaption [id]="titleId()">{{ c.title }}</figcaption>
      <div
        class="chart"
        echarts
        [options]="options()"
        [initOpts]="{ renderer: 'svg' }"
        role="img"
        [attr.aria-label]="c.summary"
        [attr.data-chart]="c.key"
      ></div>
      <p class="summary">{{ c.summary }}</p>
      <details>
        <summary>Show the numbers</summary>
        <div class="table-scroll">
          <table [attr.aria-labelledby]="titleId()">
            <thead>
              <tr>
                @for (col of c.table.columns; track $index) {
                  <th scope="col">{{ col }}</th>
                }
              </tr>
            </thead>
            <tbody>
              @for (row of c.table.rows; track $index) {
                <tr>
                  @for (cell of row; track $index) {
                    <td [class.num]="isNumber(cell)">{{ cell }}</td>
                  }
                </tr>
              } @empty {
                <tr>
                  <td [attr.colspan]="c.table.columns.length">Nothing to show yet.</td>
                </tr>
              }
            </tbody>
          </table>
        </div>
      </details>
    </figure>
  `,
  styleUrl: './report-chart.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReportChart {
  /** The chart's options and text, as the server computed them. */
  readonly chart = input.required<ReportChartData>();

  protected readonly titleId = computed(() => `report-chart-${this.chart().key}`);
  /** The options with the app's type face; the figures are the server's, untouched. */
  protected readonly options = computed(() => ({
    ...this.chart().option,
    textStyle: { fontFamily: 'Work Sans, sans-serif' },
    tooltip: { trigger: 'item' },
  }));

  protected isNumber(cell: string | number): boolean {
    return typeof cell === 'number';
  }
}
