import type { Express } from 'express';
import { accessRuleOf, type AccessRule } from '../../src/http/access';
import { routeStepOf, type RouteStep } from '../../src/http/routes';

/** One route found in the Express router stack. */
export interface FoundRoute {
  method: string;
  /** Full path, mount paths included (Express syntax, `:param`). */
  path: string;
  /** The access rule of the first handler, if it carries one. */
  rule: AccessRule | undefined;
}

interface Layer {
  route?: {
    path: string | RegExp;
    methods: Record<string, boolean>;
    stack: { handle: unknown; method?: string }[];
  };
  handle: { stack?: Layer[] };
  rawPath?: string | RegExp | (string | RegExp)[];
}

function pathText(p: string | RegExp | (string | RegExp)[] | undefined): string {
  if (p === undefined) return '';
  if (Array.isArray(p)) return p.map(pathText).join('|');
  return p instanceof RegExp ? `regex:${p.source}` : p;
}

function join(prefix: string, p: string): string {
  if (p === '/' || p === '') return prefix || '/';
  return `${prefix.replace(/\/$/, '')}${p.startsWith('/') || p.startsWith('regex:') ? '' : '/'}${p}`;
}

/**
 * Walks an Express 5 app's router (`app.router.stack`), descending into mounted routers, and
 * lists every route with the access rule its first handler carries.
 */
export function listRoutes(app: Express): FoundRoute[] {
  const found: FoundRoute[] = [];
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const fullPath = join(prefix, pathText(layer.route.path));
        const rule = accessRuleOf(layer.route.stack[0]?.handle);
        for (const method of Object.keys(layer.route.methods)) {
          found.push({ method: method.toUpperCase(), path: fullPath, rule });
        }
      } else if (Array.isArray(layer.handle?.stack)) {
        walk(layer.handle.stack, join(prefix, pathText(layer.rawPath)));
      }
    }
  };
  const router = (app as unknown as { router: { stack: Layer[] } }).router;
  walk(router.stack, '');
  return found;
}

/** One route with the steps its middleware carries, in the order Express runs them. */
export interface RouteSteps {
  method: string;
  path: string;
  steps: (RouteStep | undefined)[];
}

/** Like {@link listRoutes}, with every handler's route step (access, address, scope, body). */
export function listRouteSteps(app: Express): RouteSteps[] {
  const found: RouteSteps[] = [];
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const fullPath = join(prefix, pathText(layer.route.path));
        const steps = layer.route.stack.map((h) => routeStepOf(h.handle));
        for (const method of Object.keys(layer.route.methods)) {
          found.push({ method: method.toUpperCase(), path: fullPath, steps });
        }
      } else if (Array.isArray(layer.handle?.stack)) {
        walk(layer.handle.stack, join(prefix, pathText(layer.rawPath)));
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, '');
  return found;
}
