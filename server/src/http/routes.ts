import {
  Router,
  type NextFunction,
  type Request,
  type RequestHandler,
  type Response,
} from 'express';
import type { z } from 'zod';
import { access, type AccessRule } from './access';
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
  /** Middleware run after access and validation, before the handler (e.g. rate limits). */
  before?: RequestHandler[];
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
    const validate: RequestHandler = (req, res, next) => {
      const parts: Record<'body' | 'params' | 'query', unknown> = {
        body: undefined,
        params: undefined,
        query: undefined,
      };
      for (const part of ['params', 'query', 'body'] as const) {
        const schema = spec[part];
        if (!schema) continue;
        const result = schema.safeParse(part === 'body' ? (req.body ?? {}) : req[part]);
        if (!result.success) return next(validationError(part, result.error));
        parts[part] = result.data;
      }
      res.locals.validated = parts;
      next();
    };
    const run: RequestHandler = async (req, res, next) => {
      const parts = res.locals.validated as Record<'body' | 'params' | 'query', unknown>;
      await handler({
        req,
        res,
        next,
        body: parts.body as Out<B>,
        params: parts.params as Out<P>,
        query: parts.query as Out<Q>,
      });
    };
    this.router[spec.method](spec.path, access(spec.access), validate, ...(spec.before ?? []), run);
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
