import { Routes } from '@angular/router';
import { roleGuard } from '../../core/guards';
import { LoanList } from './loan-list';
import { LoanPage } from './loan-page';
import { LoanRequest } from './loan-request';

/**
 * `/loans`: the hospital's loans, a new request (buyers) and one loan. The parent route lets
 * the hospital's buyers and clinicians in (clinicians read only), and the lender's people and
 * the admin, who open single loans only.
 */
export const loansRoutes: Routes = [
  {
    path: '',
    component: LoanList,
    canActivate: [roleGuard('buyer', 'clinician')],
    title: 'Loans',
  },
  {
    path: 'new',
    component: LoanRequest,
    canActivate: [roleGuard('buyer')],
    title: 'Request a loan',
  },
  { path: ':id', component: LoanPage, title: 'Loan' },
  {
    // The evaluation report lives in the evidence feature, with its own lazy chart library.
    path: ':id/report',
    loadChildren: () => import('../evidence/evidence.routes').then((m) => m.evidenceReportRoutes),
  },
];
