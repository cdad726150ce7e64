import {
  OpenAPIRegistry,
  OpenApiGeneratorV3,
  type RouteConfig,
} from '@asteasolutions/zod-to-openapi';
import type { z } from 'zod';
import type { AccessRule } from './access';
import type { CatalogueEntry } from './routes';

/** Express `:name` segments become OpenAPI `{name}`. */
export function toOpenApiPath(expressPath: string): string {
  return expressPath.replace(/:([A-Za-z0-9_]+)/g, '{$1}');
}

function describeAccess(rule: AccessRule): string {
  if ('public' in rule) return 'Access: anyone.';
  if ('authenticated' in rule) return 'Access: any signed-in person.';
  const scope = rule.org ? ` in the organisation given by ${rule.org.replace(':', ' ')}` : '';
  return `Access: ${rule.roles.join(', ')}${scope} (admin: the platform admin, any organisation).`;
}

/**
 * Builds the OpenAPI 3 document from the route catalogue: the same zod schemas that validate
 * requests describe them here, so the document cannot drift from the code.
 */
export function buildOpenApiDocument(catalogue: readonly CatalogueEntry[], serverUrl: string) {
  const registry = new OpenAPIRegistry();
  registry.registerComponent('securitySchemes', 'session', {
    type: 'apiKey',
    in: 'cookie',
    name: 'evalon.sid',
    description: 'Session cookie set at sign-in. Changing requests also send X-XSRF-TOKEN.',
  });

  for (const entry of catalogue) {
    const { spec } = entry;
    const responses: RouteConfig['responses'] = {};
    for (const [status, response] of Object.entries(spec.responses)) {
      responses[status] = {
        description: response.description,
        ...(response.schema
          ? { content: { 'application/json': { schema: response.schema as z.ZodType } } }
          : {}),
        ...(response.headers
          ? {
              headers: Object.fromEntries(
                Object.entries(response.headers).map(([name, description]) => [
                  name,
                  { description, schema: { type: 'string' } },
                ]),
              ),
            }
          : {}),
      };
    }
    const isPublic = 'public' in spec.access;
    registry.registerPath({
      method: entry.method,
      path: toOpenApiPath(entry.path),
      tags: [entry.tag],
      summary: spec.summary,
      description: [spec.description, describeAccess(spec.access)].filter(Boolean).join('\n\n'),
      security: isPublic ? [] : [{ session: [] }],
      request: {
        // The catalogue keeps schemas as plain ZodType; the generator wants objects here.
        ...(spec.params ? { params: spec.params as never } : {}),
        ...(spec.query ? { query: spec.query as never } : {}),
        ...(spec.body
          ? { body: { required: true, content: { 'application/json': { schema: spec.body } } } }
          : {}),
      },
      responses,
    });
  }

  return new OpenApiGeneratorV3(registry.definitions).generateDocument({
    openapi: '3.0.3',
    info: {
      title: 'Evalon API',
      version: '0.1.0',
      description:
        'Evalon schedules and documents evaluation loans and proctoring visits; it does not ' +
        'certify anyone. Errors are `{error: {code, message, details?}}`. Changing requests ' +
        '(POST, PUT, PATCH, DELETE) send the `XSRF-TOKEN` cookie value in `X-XSRF-TOKEN`.',
    },
    servers: [{ url: serverUrl }],
  });
}
