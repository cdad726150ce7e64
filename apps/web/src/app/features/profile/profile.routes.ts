import { Routes } from '@angular/router';
import { Profile } from './profile';

/** `/profile`. */
export const profileRoutes: Routes = [{ path: '', component: Profile, title: 'Your profile' }];
