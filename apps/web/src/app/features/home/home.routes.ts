import { Routes } from '@angular/router';
import { Home } from './home';

/** `/`: the signed-in start page. */
export const homeRoutes: Routes = [{ path: '', component: Home, title: 'Home' }];
