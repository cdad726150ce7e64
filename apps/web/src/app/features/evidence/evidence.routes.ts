import { Routes } from '@angular/router';
import { provideEchartsCore } from 'ngx-echarts';
import { EvaluationReportPage } from './evaluation-report';

/**
 * `/loans/:id/report`: the evaluation report. The chart library is provided here, loaded on
 * demand with only the parts the report uses (`echarts/core`), so no other page carries it.
 */
export const evidenceReportRoutes: Routes = [
  {
    path: '',
    component: EvaluationReportPage,
    title: 'Evaluation report',
    providers: [
      provideEchartsCore({ echarts: () => import('./echarts-parts').then((m) => m.echarts) }),
    ],
  },
];
