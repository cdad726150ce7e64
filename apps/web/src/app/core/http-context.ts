import { HttpContextToken } from '@angular/common/http';

/** Whether a 401 on this request is an expected answer that must not send people to sign-in. */
export const SKIP_SIGN_IN_REDIRECT = new HttpContextToken<boolean>(() => false);
