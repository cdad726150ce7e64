import { Routes } from '@angular/router';
import { roleGuard } from '../../core/guards';
import { LoanList } from './loan-list';
import { LoanPage } from './loan-page';
import { LoanRequest } from './loan-request';

/**
 * `/loans`: the hospital's loans, a new request (buyers) and one loan. The parent route lets
 * buyers and clinicians in; clinicians read only.
 */
export const loansRoutes: Routes = [
  { path: '', component: LoanList, title: 'Loans' },
  {
    path: 'new',
    component: LoanRequest,
    canActivate: [roleGuard('buyer')],
    title: 'Request a loan',
  },
  { path: ':id', component: LoanPage, title: 'Loan' },
];
