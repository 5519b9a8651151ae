/**
 * The OpenAPI document: valid against the official OpenAPI 3.1 JSON Schema (checked with
 * @seriousme/openapi-schema-validator, which bundles the OpenAPI Initiative's schemas), and
 * listing exactly the routes the routers really have, so a new route cannot be missed.
 */
import { Validator } from '@seriousme/openapi-schema-validator';
import { expect } from 'chai';
import { toOpenApiPath } from '../../server/openapi/build-openapi.js';
import { listApiRoutes } from './helpers/route-table.js';
import { startTestServer, type TestServer } from './helpers/test-server.js';

describe('OpenAPI document', function () {
  this.timeout(180_000);
  let server: TestServer;
  let doc: { openapi: string; paths: Record<string, Record<string, { security?: unknown[]; requestBody?: unknown }>> };

  before(async () => {
    server = await startTestServer();
    doc = (await server.client().getJson('/api/openapi.json')) as typeof doc;
  });
  after(() => server?.close());

  it('validates against the OpenAPI 3.1 schema', async () => {
    const validator = new Validator();
    const result = await validator.validate(doc as never);
    expect(result.errors ?? [], JSON.stringify(result.errors, null, 1)?.slice(0, 2000)).to.deep.equal([]);
    expect(result.valid).to.equal(true);
    expect(validator.version).to.equal('3.1');
  });

  it('lists every route of the routers, and nothing else', () => {
    const real = new Set(listApiRoutes(server.ctx).map((r) => `${r.method} ${toOpenApiPath(r.path)}`));
    const documented = new Set(Object.entries(doc.paths).flatMap(([p, ops]) => Object.keys(ops).map((m) => `${m.toUpperCase()} ${p}`)));
    const missing = [...real].filter((r) => !documented.has(r));
    const stale = [...documented].filter((d) => !real.has(d));
    expect(missing, 'routes without an entry in server/openapi/api-catalogue.ts').to.deep.equal([]);
    expect(stale, 'documented routes that do not exist').to.deep.equal([]);
  });

  it('describes bodies from the zod schemas and marks public routes', () => {
    const submit = doc.paths['/api/jobs'].post as { requestBody: { content: { 'application/json': { schema: { properties: Record<string, unknown>; required: string[] } } } } };
    const schema = submit.requestBody.content['application/json'].schema;
    expect(schema.properties).to.have.keys('name', 'kind', 'recordingId', 'arrayId', 'trainingRecordingId', 'params', 'priority', 'runAfter', 'maxAttempts');
    expect(schema.required).to.include.members(['name', 'recordingId']);
    expect(doc.paths['/api/health'].get.security).to.deep.equal([]);
    expect(doc.paths['/api/users'].get.security).to.equal(undefined);
  });
});
