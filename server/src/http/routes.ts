import {
  Router,
  type NextFunction,
  type Request,
  type RequestHandler,
  type Response,
} from 'express';
import type { z } from 'zod';
import { access, accessRuleOf, type AccessRule } from './access';
import { validationError } from './errors';

/** HTTP methods the API uses. */
export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

/** One documented response of a route. */
export interface ResponseSpec {
  description: string;
  /** JSON body schema; omit for empty bodies (204, 302). */
  schema?: z.ZodType;
  /** Response headers worth documenting, by name. */
  headers?: Record<string, string>;
}

/** Everything about one route: where it lives, who may call it, what it takes and answers. */
export interface RouteSpec<
  B extends z.ZodType | undefined = undefined,
  P extends z.ZodType | undefined = undefined,
  Q extends z.ZodType | undefined = undefined,
> {
  method: Method;
  /** Path below the router's base, Express syntax (`/:orgId/members`). */
  path: string;
  summary: string;
  description?: string;
  access: AccessRule;
  body?: B;
  params?: P;
  query?: Q;
  responses: Record<number, ResponseSpec>;
  /**
   * Loads the resource the path names and refuses (404) when the person may not see it, e.g.
   * another organisation's loan. Runs after the access rule and the path/query checks and
   * BEFORE the body is validated, so a stranger learns nothing from validation messages.
   */
  scope?: (req: Request, params: Out<P>) => Promise<void>;
  /** Middleware run after access and validation, before the handler (e.g. rate limits). */
  before?: RequestHandler[];
}

/**
 * The steps every route runs, in this order: who may call it, which resource the path and query
 * name (validated), whether that resource is theirs, then the body. Each middleware carries its
 * step so the route walker test can check the order.
 */
export const routeSteps = ['access', 'address', 'scope', 'body'] as const;
export type RouteStep = (typeof routeSteps)[number];
const routeStepKey = 'routeStep';

function step(name: RouteStep, handler: RequestHandler): RequestHandler {
  return Object.assign(handler, { [routeStepKey]: name });
}

/** The step a route middleware carries, if any (read by the route walker test). */
export function routeStepOf(handler: unknown): RouteStep | undefined {
  if (typeof handler !== 'function') return undefined;
  if (accessRuleOf(handler)) return 'access';
  return (handler as { [routeStepKey]?: RouteStep })[routeStepKey];
}

/** A route as the OpenAPI generator sees it, with the full path. */
export interface CatalogueEntry {
  method: Method;
  /** Full Express path, e.g. `/api/organisations/:orgId/members`. */
  path: string;
  tag: string;
  spec: RouteSpec<z.ZodType | undefined, z.ZodType | undefined, z.ZodType | undefined>;
}

type Out<T> = T extends z.ZodType ? z.output<T> : undefined;

/** What a handler receives: the request parts already validated and typed. */
export interface RouteInput<B, P, Q> {
  req: Request;
  res: Response;
  next: NextFunction;
  body: B;
  params: P;
  query: Q;
}

/**
 * A router that documents itself: each route is validated with its zod schemas, guarded by its
 * access rule and recorded in the shared catalogue the OpenAPI document is built from.
 */
export class ApiRouter {
  /** The Express router to mount at {@link basePath}. */
  readonly router = Router();

  constructor(
    /** Where the router is mounted, e.g. `/api/auth`. */
    readonly basePath: string,
    /** OpenAPI tag for every route of this router. */
    readonly tag: string,
    private readonly catalogue: CatalogueEntry[],
  ) {}

  /** Adds a route. The handler may be async; Express 5 forwards rejections to the error middleware. */
  route<
    B extends z.ZodType | undefined = undefined,
    P extends z.ZodType | undefined = undefined,
    Q extends z.ZodType | undefined = undefined,
  >(
    spec: RouteSpec<B, P, Q>,
    handler: (input: RouteInput<Out<B>, Out<P>, Out<Q>>) => unknown,
  ): this {
    const parts: (req: Request, res: Response) => Record<'body' | 'params' | 'query', unknown> = (
      _req,
      res,
    ) => (res.locals.validated ??= { body: undefined, params: undefined, query: undefined });
    const validate =
      (which: readonly ('body' | 'params' | 'query')[]): RequestHandler =>
      (req, res, next) => {
        const into = parts(req, res);
        for (const part of which) {
          const schema = spec[part];
          if (!schema) continue;
          const result = schema.safeParse(part === 'body' ? (req.body ?? {}) : req[part]);
          if (!result.success) return next(validationError(part, result.error));
          into[part] = result.data;
        }
        next();
      };
    const scope = spec.scope;
    const steps: RequestHandler[] = [
      access(spec.access),
      step('address', validate(['params', 'query'])),
      ...(scope
        ? [
            step('scope', async (req, res, next) => {
              await scope(req, parts(req, res).params as Out<P>);
              next();
            }),
          ]
        : []),
      step('body', validate(['body'])),
    ];
    const run: RequestHandler = async (req, res, next) => {
      const valid = parts(req, res);
      await handler({
        req,
        res,
        next,
        body: valid.body as Out<B>,
        params: valid.params as Out<P>,
        query: valid.query as Out<Q>,
      });
    };
    this.router[spec.method](spec.path, ...steps, ...(spec.before ?? []), run);
    this.catalogue.push({
      method: spec.method,
      path: joinPath(this.basePath, spec.path),
      tag: this.tag,
      spec: spec as CatalogueEntry['spec'],
    });
    return this;
  }
}

function joinPath(base: string, path: string): string {
  const joined = `${base.replace(/\/+$/, '')}/${path.replace(/^\/+/, '')}`;
  return joined.length > 1 ? joined.replace(/\/+$/, '') : joined;
}
