import { OpenAPIRegistry, OpenApiGeneratorV31 } from '@asteasolutions/zod-to-openapi';
import { Problem } from '@earmark/contracts';
import { z } from 'zod';
import type { RouteDef } from './route.js';

const accessText: Record<RouteDef['access']['kind'], string> = {
  public: 'No credentials.',
  user: 'Any signed-in user (bearer JWT).',
  admin: 'Administrators only.',
  project: 'Members of the project whose role grants',
  ci: 'A CI token of the project (or a member) whose scopes grant',
};

/**
 * The OpenAPI 3.1 document, generated from the same route table the app mounts and
 * the zod schemas of packages/contracts, so it cannot drift from the code.
 */
export function buildOpenApiDocument(routes: RouteDef[], serverUrl: string): object {
  const registry = new OpenAPIRegistry();
  registry.registerComponent('securitySchemes', 'bearer', {
    type: 'http',
    scheme: 'bearer',
    description: 'A session access token (JWT) or, on /api/v1 routes, a CI token `em_<prefix>_<secret>`.',
  });
  for (const route of routes) {
    const doc = route.doc ?? {};
    const params = [...route.path.matchAll(/:(\w+)/g)].map((m) => m[1]!);
    const access = route.access;
    const who = 'permission' in access ? `${accessText[access.kind]} \`${access.permission}\`.` : accessText[access.kind];
    const status = route.status ?? 200;
    registry.registerPath({
      method: route.method,
      path: route.path.replace(/:(\w+)/g, '{$1}').replace('{sha}/junit.xml', '{sha}/junit.xml'),
      summary: route.summary,
      description: who,
      tags: doc.tags ?? [route.path.startsWith('/api/v1/') ? 'CI' : route.path.split('/')[2] ?? 'api'],
      security: access.kind === 'public' ? [] : [{ bearer: [] }],
      request: {
        ...(params.length ? { params: z.object(Object.fromEntries(params.map((p) => [p, z.string()]))) } : {}),
        ...(route.query instanceof z.ZodObject ? { query: route.query } : doc.query ? { query: doc.query } : {}),
        ...(route.body || doc.bodyContentTypes
          ? { body: { content: Object.fromEntries((doc.bodyContentTypes ?? ['application/json']).map((t) => [t, { schema: t === 'application/json' && route.body ? route.body : z.string() }])) } }
          : {}),
      },
      responses: {
        [status]: {
          description: doc.responseContentType ?? (route.response ? 'OK' : 'No content'),
          ...(route.response ? { content: { 'application/json': { schema: route.response } } } : {}),
          ...(doc.responseContentType ? { content: { [doc.responseContentType]: { schema: z.string() } } } : {}),
        },
        default: { description: 'An error as RFC 9457 problem details', content: { 'application/problem+json': { schema: Problem } } },
      },
    });
  }
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Earmark API',
      version: '1',
      description: 'Acceptance tests for audio DSP firmware builds. Errors are application/problem+json. Levels in dBFS follow AES17 (a full-scale sine is 0 dBFS).',
    },
    servers: [{ url: serverUrl }],
  });
}
