import type { AuthContext } from '../identity';

declare global {
  namespace Express {
    interface Request {
      /** The signed-in person, set by the session loader; undefined for anonymous requests. */
      auth?: AuthContext;
    }
  }
}

declare module 'express-session' {
  interface SessionData {
    /** The signed-in user's id; also read by the `sessions.user_id` generated column. */
    userId?: number;
    /** When the person signed in (ms since epoch), for the absolute timeout. */
    authenticatedAt?: number;
    /** The CSRF token the `XSRF-TOKEN` cookie mirrors. */
    csrfToken?: string;
  }
}

export {};
