import { Routes } from '@angular/router';
import { NotificationList } from './notification-list';

/** `/notifications`: everything Evalon told the signed-in person, newest first. */
export const notificationsRoutes: Routes = [
  { path: '', component: NotificationList, title: 'Notifications' },
];
