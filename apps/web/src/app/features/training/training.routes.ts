import { Routes } from '@angular/router';
import { roleGuard } from '../../core/guards';
import { TrainingRecordPage } from './training-record';

/** `/training`: a clinician's own training record as a trainee on proctoring visits. */
export const trainingRoutes: Routes = [
  {
    path: '',
    component: TrainingRecordPage,
    canActivate: [roleGuard('clinician')],
    title: 'My training',
  },
];
