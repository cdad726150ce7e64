import { Routes } from '@angular/router';
import { roleGuard } from '../../core/guards';
import { VisitList } from './visit-list';
import { VisitPage } from './visit-page';
import { VisitRequest } from './visit-request';

/**
 * `/visits`: the hospital's proctoring visits, a new request and one visit. Proctors open single
 * visits offered to them (from their home and notifications).
 */
export const visitsRoutes: Routes = [
  {
    path: '',
    component: VisitList,
    canActivate: [roleGuard('buyer', 'clinician')],
    title: 'Proctoring visits',
  },
  {
    path: 'new',
    component: VisitRequest,
    canActivate: [roleGuard('buyer', 'clinician')],
    title: 'Ask for a proctor',
  },
  { path: ':id', component: VisitPage, title: 'Visit' },
];
