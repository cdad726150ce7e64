import { Routes } from '@angular/router';
import { ApprovalQueue } from './approval-queue';

/** `/approvals`: the fleet manager's queue of loan requests (`?loan=` picks the one shown). */
export const approvalsRoutes: Routes = [{ path: '', component: ApprovalQueue, title: 'Approvals' }];
