import { z } from 'zod';
import { apiErrorSchema } from '../../shared/api/error.js';
import { CSRF_HEADER } from '../../shared/api/auth.js';
import { RESULTS_CAUTION } from '../../shared/params/result-caution.js';
import { APP_VERSION } from '../version.js';
import { API_CATALOGUE, type ApiOperation } from './api-catalogue.js';

type Json = Record<string, unknown>;

/** zod 4's own converter; input side for what clients send, output side for what they get. */
const jsonSchema = (s: z.ZodType, io: 'input' | 'output'): Json => {
  const out = z.toJSONSchema(s, { io, unrepresentable: 'any', target: 'draft-2020-12' }) as Json;
  delete out.$schema;
  return out;
};

/** /api/jobs/:id/cancel -> /api/jobs/{id}/cancel */
export const toOpenApiPath = (p: string): string => p.replace(/:(\w+)/g, '{$1}');

function parameters(o: ApiOperation): Json[] {
  const params: Json[] = [...o.path.matchAll(/:(\w+)/g)].map((m) => ({ name: m[1], in: 'path', required: true, schema: { type: m[1] === 'secret' ? 'string' : 'integer' } }));
  if (o.query) {
    const q = jsonSchema(o.query, 'input') as { properties?: Record<string, Json>; required?: string[] };
    for (const [name, schema] of Object.entries(q.properties ?? {})) {
      params.push({ name, in: 'query', required: q.required?.includes(name) ?? false, schema });
    }
  }
  return params;
}

function operation(o: ApiOperation): Json {
  const status = String(o.status ?? 200);
  const success: Json =
    o.produces === 'none'
      ? { description: 'Done (no body).' }
      : o.produces
        ? { description: 'The file.', content: { [o.produces]: { schema: { type: 'string' } } } }
        : { description: 'Success.', content: { 'application/json': { schema: o.response ? jsonSchema(o.response, 'output') : { type: 'object' } } } };
  const error = { description: 'The request was refused; the message says what is wrong and what to do.', content: { 'application/json': { schema: { $ref: '#/components/schemas/ApiError' } } } };
  const who = o.access === 'public' ? 'Public.' : `Needs the ${o.access} role or higher.${o.tokens ? ' API tokens accepted.' : ' Browser session only for changes.'}`;
  const body =
    o.bodyKind === 'multipart'
      ? { required: true, content: { 'multipart/form-data': { schema: { type: 'object', properties: { sha256: { type: 'string' }, chunk: { type: 'string', format: 'binary' } }, required: ['sha256', 'chunk'] } } } }
      : o.body
        ? { required: true, content: { 'application/json': { schema: jsonSchema(o.body, 'input') } } }
        : undefined;
  return {
    operationId: `${o.method.toLowerCase()}${o.path.replace(/^\/api/, '').replace(/[^a-zA-Z0-9]+(\w)?/g, (_m, c: string | undefined) => (c ? c.toUpperCase() : ''))}`,
    tags: [o.tag],
    summary: o.summary,
    description: who,
    ...(o.access === 'public' ? { security: [] } : {}),
    parameters: parameters(o),
    ...(body ? { requestBody: body } : {}),
    responses: { [status]: success, default: error },
  };
}

/** The OpenAPI 3.1 document of the whole HTTP API, generated from the catalogue and the zod schemas. */
export function buildOpenApi(): Json {
  const paths: Record<string, Json> = {};
  for (const o of API_CATALOGUE) {
    const p = toOpenApiPath(o.path);
    paths[p] ??= {};
    paths[p][o.method.toLowerCase()] = operation(o);
  }
  return {
    openapi: '3.1.0',
    info: {
      title: 'Nullsmith API',
      version: APP_VERSION,
      description: [
        'Adaptive beamforming of multichannel array recordings: upload, describe arrays, queue jobs, download per-window CSV.',
        `Browsers use the session cookie and send the ${CSRF_HEADER} header on changes; scripts send "Authorization: Bearer <token>" (create tokens on the Profile page).`,
        RESULTS_CAUTION,
      ].join('\n\n'),
    },
    servers: [{ url: '/' }],
    security: [{ bearerToken: [] }, { sessionCookie: [] }],
    tags: [...new Set(API_CATALOGUE.map((o) => o.tag))].map((name) => ({ name })),
    paths,
    components: {
      securitySchemes: {
        bearerToken: { type: 'http', scheme: 'bearer', description: 'Personal API token (nsk_...), scope read or submit.' },
        sessionCookie: { type: 'apiKey', in: 'cookie', name: 'nullsmith.sid' },
      },
      schemas: { ApiError: jsonSchema(apiErrorSchema, 'output') },
    },
  };
}
