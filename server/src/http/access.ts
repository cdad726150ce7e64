import type { Request, RequestHandler } from 'express';
import type { Role } from '@evalon/contracts';
import { AppError } from '../errors';
import { notSignedInError } from './session';
import type { AuthContext } from '../identity';

/** Where a route finds the organisation it acts on: a path parameter or a query parameter. */
export type OrganisationSource = `param:${string}` | `query:${string}`;

/**
 * Who may call a route. Exactly one of:
 * - `{ public: true }`: anyone, signed in or not;
 * - `{ authenticated: true }`: any signed-in, active person;
 * - `{ roles, org? }`: a signed-in person holding one of `roles`; with `org`, holding it in that
 *   organisation. `admin` in `roles` means the platform admin, who passes for any organisation.
 */
export type AccessRule =
  { public: true } | { authenticated: true } | { roles: readonly Role[]; org?: OrganisationSource };

/** Name of the property that carries the rule on the middleware (read by the route walker test). */
export const accessRuleKey = 'accessRule';

/** A middleware that enforces an {@link AccessRule} and carries it for inspection. */
export type AccessMiddleware = RequestHandler & { [accessRuleKey]: AccessRule };

/** The rule a handler carries, if it is an access middleware. */
export function accessRuleOf(handler: unknown): AccessRule | undefined {
  if (typeof handler !== 'function') return undefined;
  return (handler as Partial<AccessMiddleware>)[accessRuleKey];
}

/** The organisation id named by `source` on this request, or null when absent or not a number. */
export function organisationIdFrom(req: Request, source: OrganisationSource): number | null {
  const [where, name] = source.split(':') as ['param' | 'query', string];
  const raw: unknown =
    where === 'param' ? req.params[name] : (req.query as Record<string, unknown>)[name];
  if (typeof raw !== 'string' || !/^\d{1,10}$/.test(raw)) return null;
  return Number(raw);
}

/** Whether `auth` satisfies a roles rule for the organisation `organisationId` (null = any). */
export function holdsRole(
  auth: AuthContext,
  roles: readonly Role[],
  organisationId: number | null,
): boolean {
  if (roles.includes('admin') && auth.isPlatformAdmin) return true;
  return auth.user.memberships.some(
    (m) =>
      roles.includes(m.role) && (organisationId === null || m.organisationId === organisationId),
  );
}

/**
 * Declares and enforces who may call a route. Put it first in every route's handler list;
 * a test walks the router and fails for any route without one.
 */
export function access(rule: AccessRule): AccessMiddleware {
  const middleware: RequestHandler = (req, res, next) => {
    if ('public' in rule) return next();
    const auth = req.auth;
    if (!auth) return next(notSignedInError(res));
    if ('authenticated' in rule) return next();
    let organisationId: number | null = null;
    if (rule.org) {
      organisationId = organisationIdFrom(req, rule.org);
      if (organisationId === null && !(rule.roles.includes('admin') && auth.isPlatformAdmin)) {
        return next(AppError.forbidden('forbidden', 'Choose an organisation you look after.'));
      }
    }
    if (!holdsRole(auth, rule.roles, organisationId)) return next(AppError.forbidden());
    next();
  };
  return Object.assign(middleware, { [accessRuleKey]: rule });
}

/** The signed-in person; throws 401 when there is none (for handlers behind `access`). */
export function currentAuth(req: Request): AuthContext {
  if (!req.auth) throw AppError.unauthorized();
  return req.auth;
}
