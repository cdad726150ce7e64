import helmet from 'helmet';
import type { RequestHandler } from 'express';
import type { Config } from '../config';

/**
 * Security headers. The content security policy allows only our own origin for scripts,
 * styles, fonts (self-hosted Work Sans and icon font), images and API calls, which also covers
 * the later maps stand-in script served from our origin. Inline styles stay allowed because
 * Angular Material and the CDK position overlays with style attributes. Forms may post to our
 * origin and hand over to the sign-in provider.
 */
export function securityHeaders(config: Config): RequestHandler {
  const https = config.http.secureCookies;
  const signInProvider = new URL(config.google.authorizationUrl).origin;
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'"],
        scriptSrcAttr: ["'none'"],
        styleSrc: ["'self'", "'unsafe-inline'"],
        fontSrc: ["'self'", 'data:'],
        imgSrc: ["'self'", 'data:', 'blob:'],
        connectSrc: ["'self'"],
        formAction: ["'self'", signInProvider],
        frameAncestors: ["'none'"],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        ...(https ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    strictTransportSecurity: https ? { maxAge: 15_552_000, includeSubDomains: true } : false,
    referrerPolicy: { policy: 'same-origin' },
  });
}
