import { z, type ZodType } from 'zod';
import type { RouteDoc } from './http';
import type { OpenApiAnswer } from '@shared/schemas/system';
import { CAUTION } from '@shared/caution';

const errorSchema = {
  type: 'object',
  required: ['error'],
  properties: {
    error: {
      type: 'object',
      required: ['code', 'message'],
      properties: {
        code: { type: 'string' },
        message: { type: 'string' },
        fields: { type: 'object', additionalProperties: { type: 'string' }, description: 'field path → reason' },
      },
    },
  },
};

function jsonSchema(schema: ZodType, io: 'input' | 'output' = 'input'): Record<string, unknown> {
  const s = z.toJSONSchema(schema, { io, unrepresentable: 'any', target: 'draft-2020-12' }) as Record<string, unknown>;
  delete s.$schema;
  return s;
}

/** The OpenAPI 3.1 document, generated from the same declarations that authorise and validate. */
export function openApiDocument(specs: RouteDoc[]): OpenApiAnswer {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const spec of specs) {
    const path = spec.path.replace(/:([A-Za-z_]+)/g, '{$1}');
    const parameters: unknown[] = [];
    for (const m of spec.path.matchAll(/:([A-Za-z_]+)/g)) {
      parameters.push({ name: m[1], in: 'path', required: true, schema: { type: m[1] === 'token' ? 'string' : 'integer' } });
    }
    if (spec.query) {
      const q = jsonSchema(spec.query) as { properties?: Record<string, unknown>; required?: string[] };
      for (const [name, schema] of Object.entries(q.properties ?? {})) {
        parameters.push({ name, in: 'query', required: q.required?.includes(name) ?? false, schema });
      }
    }
    const responses: Record<string, unknown> = {};
    const ok = spec.responses ?? {};
    if (!Object.keys(ok).some((k) => Number(k) < 300)) ok[200] = 'Success';
    for (const [status, description] of Object.entries(ok)) {
      const n = Number(status);
      responses[status] =
        n >= 400
          ? { description, content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } }
          : spec.produces
            ? { description, content: { [spec.produces]: { schema: { type: 'string', format: 'binary' } } } }
            : spec.response && n !== 204
              ? { description, content: { 'application/json': { schema: jsonSchema(spec.response, 'output') } } }
              : { description };
    }
    const common: Record<string, string> = { 400: 'Invalid input: the fields and reasons are named' };
    if (spec.access.kind !== 'public') Object.assign(common, { 401: 'Not signed in', 403: 'Not allowed for your role or site' });
    if (spec.path.includes(':')) common[404] = 'Not found';
    for (const [s, d] of Object.entries(common)) {
      responses[s] ??= { description: d, content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } };
    }
    const op: Record<string, unknown> = {
      summary: spec.summary,
      tags: [spec.tag],
      operationId: `${spec.method}${path.replace(/[^A-Za-z0-9]+(.)?/g, (_m, c: string | undefined) => (c ? c.toUpperCase() : ''))}`,
      ...(parameters.length ? { parameters } : {}),
      responses,
      ...(spec.access.kind === 'public' ? { security: [] } : {}),
    };
    if (spec.body) {
      op.requestBody = { required: true, content: { 'application/json': { schema: jsonSchema(spec.body) } } };
    } else if (spec.files?.length) {
      const fileProps = Object.fromEntries(spec.files.map((f) => [f, { type: 'string', format: 'binary' }]));
      const form = spec.formJson;
      op.requestBody = {
        required: true,
        content: {
          'multipart/form-data': {
            schema: {
              type: 'object',
              properties: {
                ...(form
                  ? { [form.field]: { type: 'string', contentMediaType: 'application/json', contentSchema: jsonSchema(form.schema) } }
                  : {}),
                ...fileProps,
              },
              ...(form ? { required: [form.field] } : {}),
            },
          },
          ...(form ? { 'application/json': { schema: jsonSchema(form.schema) } } : {}),
        },
      };
    }
    (paths[path] ??= {})[spec.method] = op;
  }
  return {
    openapi: '3.1.0' as const,
    info: {
      title: 'Brink API',
      version: '1',
      description: `Loads beside open, supported excavations: sites, excavations, permits, inspections. ${CAUTION}`,
    },
    servers: [{ url: '/' }],
    components: {
      schemas: { Error: errorSchema },
      securitySchemes: { session: { type: 'apiKey', in: 'cookie', name: 'brink.sid' } },
    },
    security: [{ session: [] }],
    paths,
  };
}
