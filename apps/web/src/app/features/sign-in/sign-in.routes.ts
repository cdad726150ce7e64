import { Routes } from '@angular/router';
import { SignIn } from './sign-in';

/** `/sign-in`. */
export const signInRoutes: Routes = [{ path: '', component: SignIn, title: 'Sign in' }];
