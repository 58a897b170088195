import { z } from 'zod';
import type { AnyRoute } from './route';

const problem = {
  type: 'object',
  required: ['type', 'title', 'status'],
  properties: {
    type: { type: 'string' }, title: { type: 'string' }, status: { type: 'integer' }, detail: { type: 'string' },
    errors: { type: 'array', items: { type: 'object', properties: { field: { type: 'string' }, message: { type: 'string' } } } },
  },
};

function jsonSchema(schema: z.ZodType): object {
  return z.toJSONSchema(schema, { io: 'input', unrepresentable: 'any', target: 'draft-2020-12' });
}

/** A success body's schema, as the server sends it. */
function responseSchema(schema: z.ZodType): object {
  return z.toJSONSchema(schema, { io: 'output', unrepresentable: 'any', target: 'draft-2020-12' });
}

/** The OpenAPI 3.1 document, derived from the same route list that Express mounts. */
export function openApiDocument(routes: readonly AnyRoute[], version: string): object {
  const paths: Record<string, Record<string, object>> = {};
  for (const r of routes) {
    const path = '/api' + r.path.replace(/:([A-Za-z]+)/g, '{$1}');
    const parameters: object[] = [];
    for (const name of r.path.match(/:([A-Za-z]+)/g) ?? []) {
      parameters.push({ name: name.slice(1), in: 'path', required: true, schema: { type: 'string' } });
    }
    if (r.query) {
      const qs = jsonSchema(r.query) as { properties?: Record<string, object>; required?: string[] };
      for (const [name, schema] of Object.entries(qs.properties ?? {})) {
        parameters.push({ name, in: 'query', required: qs.required?.includes(name) ?? false, schema });
      }
    }
    const status = r.status ?? 200;
    const responses: Record<string, object> = {
      [status]: {
        description: r.responses?.[status] ?? (status === 204 ? 'Done' : 'Success'),
        ...(status === 204 ? {} : { content: { [r.produces ?? 'application/json']: r.response ? { schema: responseSchema(r.response) } : {} } }),
      },
      400: { description: 'Invalid input; `errors` names each field', content: { 'application/problem+json': { schema: { $ref: '#/components/schemas/Problem' } } } },
    };
    if (r.access !== 'public') {
      responses[401] = { description: 'Not signed in', content: { 'application/problem+json': { schema: { $ref: '#/components/schemas/Problem' } } } };
      responses[403] = { description: 'Role not allowed, or missing XSRF token', content: { 'application/problem+json': { schema: { $ref: '#/components/schemas/Problem' } } } };
    }
    for (const [code, description] of Object.entries(r.responses ?? {})) {
      if (Number(code) === status) continue;
      // Another success (e.g. 200 beside 202 for an idempotent request) carries the route's own body.
      responses[code] = Number(code) < 400
        ? { description, content: { [r.produces ?? 'application/json']: r.response ? { schema: responseSchema(r.response) } : {} } }
        : { description, content: { 'application/problem+json': { schema: { $ref: '#/components/schemas/Problem' } } } };
    }
    paths[path] ??= {};
    paths[path][r.method] = {
      summary: r.summary,
      tags: [r.tag],
      'x-roles': r.access,
      ...(r.access === 'public' ? { security: [] } : {}),
      ...(parameters.length ? { parameters } : {}),
      ...(r.upload ? { requestBody: { required: true, content: { 'multipart/form-data': { schema: { type: 'object', required: [r.upload.field], properties: { [r.upload.field]: { type: 'string', format: 'binary', maxLength: r.upload.maxBytes } } } } } } } : {}),
      ...(r.body ? { requestBody: { required: true, content: { 'application/json': { schema: jsonSchema(r.body) } } } } : {}),
      responses,
    };
  }
  return {
    openapi: '3.1.0',
    info: {
      title: 'Tendara API',
      version,
      description:
        'Awarding regional supply contracts by tender. Cookie sessions; every state-changing request carries ' +
        'the X-XSRF-TOKEN header equal to the XSRF-TOKEN cookie (set by GET /api/session). Errors are ' +
        'application/problem+json (RFC 9457) with a field-level `errors` list. `x-roles` lists who may call a route.',
    },
    servers: [{ url: '/' }],
    components: {
      schemas: { Problem: problem },
      securitySchemes: {
        session: { type: 'apiKey', in: 'cookie', name: 'tendara.sid' },
        xsrf: { type: 'apiKey', in: 'header', name: 'X-XSRF-TOKEN' },
      },
    },
    security: [{ session: [], xsrf: [] }],
    paths,
  };
}
