import { Routes } from '@angular/router';
import { ProctorAvailability } from './proctor-availability';
import { ProctorCalendar } from './proctor-calendar';
import { ProctorCredentials } from './proctor-credentials';
import { ProctorHome } from './proctor-home';
import { ProctorProfileEditor } from './proctor-profile';

/** `/proctor`: offers and visits, profile, credentials and availability (role `proctor`). */
export const proctorRoutes: Routes = [
  { path: '', component: ProctorHome, title: 'Visit offers' },
  { path: 'profile', component: ProctorProfileEditor, title: 'Proctor profile' },
  { path: 'credentials', component: ProctorCredentials, title: 'Credentials' },
  { path: 'availability', component: ProctorAvailability, title: 'Availability' },
  { path: 'calendar', component: ProctorCalendar, title: 'Calendar' },
];
