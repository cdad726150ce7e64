import { Routes } from '@angular/router';
import { CreditAgreements } from './credit-agreements';

/** `/credit-agreements`: the lender's fleet manager decides which hospitals may use a purchase order. */
export const creditAgreementsRoutes: Routes = [
  { path: '', component: CreditAgreements, title: 'Credit agreements' },
];
