import { Routes } from '@angular/router';
import { ForgotPassword } from './forgot-password';
import { ResetPassword } from './reset-password';

/** `/forgot-password`: ask for a reset link. */
export const forgotPasswordRoutes: Routes = [
  { path: '', component: ForgotPassword, title: 'Reset your password' },
];

/** `/reset-password?token=`: choose a new password from the e-mailed link. */
export const resetPasswordRoutes: Routes = [
  { path: '', component: ResetPassword, title: 'Choose a new password' },
];
