import { z } from 'zod';
import type { RouteDef } from '../../lib/route';

type JsonSchema = Record<string, unknown>;

function toSchema(schema: z.ZodType, io: 'input' | 'output'): JsonSchema {
  return z.toJSONSchema(schema, { io, unrepresentable: 'any' }) as JsonSchema;
}

function describeAccess(def: RouteDef): string {
  if (def.access.kind === 'public') return 'Open to anyone.';
  const roles = def.access.roles === 'any' ? 'any signed-in role' : def.access.roles.join(', ');
  const scope = def.access.category ? '; category managers only for categories they own' : '';
  const tokens = def.access.tokens ? '; also with an API token (Authorization: Bearer)' : '';
  return `Roles: ${roles}${scope}${tokens}.`;
}

/** The OpenAPI 3.1 document, built from the same route list and zod schemas the server enforces. */
export function buildOpenApi(routes: RouteDef[], serverUrl: string): JsonSchema {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const def of routes) {
    const path = def.path.replace(/:(\w+)/g, '{$1}');
    const parameters = [...def.path.matchAll(/:(\w+)/g)].map((m) => ({
      name: m[1],
      in: 'path',
      required: true,
      schema: { type: 'string' },
    }));
    if (def.query) {
      const schema = toSchema(def.query, 'input') as {
        properties?: Record<string, unknown>;
        required?: string[];
      };
      for (const [name, prop] of Object.entries(schema.properties ?? {})) {
        parameters.push({
          name,
          in: 'query',
          required: schema.required?.includes(name) ?? false,
          schema: prop as never,
        });
      }
    }
    const status = String(def.status ?? 200);
    paths[path] ??= {};
    paths[path][def.method] = {
      tags: [def.tag],
      summary: def.summary,
      description: describeAccess(def),
      parameters,
      ...(def.body
        ? {
            requestBody: {
              required: true,
              content: { 'application/json': { schema: toSchema(def.body, 'input') } },
            },
          }
        : {}),
      responses: {
        [status]: def.response
          ? {
              description: 'Success',
              content: { 'application/json': { schema: toSchema(def.response, 'output') } },
            }
          : { description: 'Success' },
        '400': { description: 'The request is not valid; `error.details` names the field and the reason.' },
        ...(def.access.kind === 'public'
          ? {}
          : {
              '401': { description: 'Not signed in' },
              '403': { description: 'Role or category not allowed' },
            }),
      },
      ...(def.access.kind === 'public'
        ? {}
        : { security: def.access.tokens ? [{ session: [] }, { bearer: [] }] : [{ session: [] }] }),
    };
  }
  return {
    openapi: '3.1.0',
    info: {
      title: 'Ballast API',
      version: '0.1.0',
      description:
        'Naive and smoothed rating rankings, drift, recency and evidence quality per category. ' +
        'Browser calls use the session cookie and send the x-csrf-token header on state-changing requests.',
    },
    servers: [{ url: serverUrl }],
    components: {
      securitySchemes: {
        session: { type: 'apiKey', in: 'cookie', name: 'ballast.sid' },
        bearer: { type: 'http', scheme: 'bearer' },
      },
    },
    paths,
  };
}
