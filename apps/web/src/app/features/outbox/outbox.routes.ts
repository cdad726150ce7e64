import { Routes } from '@angular/router';
import { OutboxPage } from './outbox-page';

/** `/outbox`: e-mails Evalon could not deliver, for the platform admin. */
export const outboxRoutes: Routes = [{ path: '', component: OutboxPage, title: 'E-mail outbox' }];
