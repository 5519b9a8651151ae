import { expect } from 'chai';
import { apiErrorSchema } from '../../shared/api/error.js';
import { userListResponseSchema } from '../../shared/api/users.js';
import { ROLES, roleAtLeast, type Role } from '../../shared/roles.js';
import { listApiRoutes, sampleUrl, type RouteInfo } from './helpers/route-table.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';

/** The only routes anyone may call signed out. */
const PUBLIC = new Set(['GET /api/health', 'POST /api/auth/login', 'POST /api/auth/logout', 'GET /api/openapi.json', 'GET /api/account-links/:secret', 'POST /api/account-links/:secret']);

describe('roles: every API route refuses the signed-out and the under-privileged', function () {
  this.timeout(300_000);
  let server: TestServer;
  let routes: RouteInfo[];
  const clients = new Map<string, TestClient>();
  before(async () => {
    server = await startTestServer();
    routes = listApiRoutes(server.ctx);
    for (const role of ROLES) clients.set(role, await server.signIn(role));
  });
  after(async () => server?.close());

  const call = (c: TestClient, r: RouteInfo) =>
    c.fetch(sampleUrl(r.path), { method: r.method, headers: { 'content-type': 'application/json' }, body: ['GET', 'HEAD', 'DELETE'].includes(r.method) ? undefined : '{}' });

  it('finds the routes (sanity check of the route walker)', () => {
    const names = routes.map((r) => `${r.method} ${r.path}`);
    expect(names).to.include.members(['GET /api/health', 'POST /api/auth/login', 'GET /api/auth/me', 'GET /api/users']);
    expect(routes.find((r) => r.path === '/api/users')?.requiredRole).to.equal('admin');
  });

  it('every non-public route has a role guard', () => {
    const unguarded = routes.filter((r) => !PUBLIC.has(`${r.method} ${r.path}`) && !r.requiredRole).map((r) => `${r.method} ${r.path}`);
    expect(unguarded, 'add requireUser or requireRole(...) to these routes').to.deep.equal([]);
  });

  it('every non-public route answers 401 when signed out', async () => {
    const anonymous = server.client();
    const wrong: string[] = [];
    for (const r of routes.filter((x) => !PUBLIC.has(`${x.method} ${x.path}`))) {
      const res = await call(anonymous, r);
      const body = await res.text();
      if (res.status !== 401 || apiErrorSchema.safeParse(JSON.parse(body)).data?.error.code !== 'unauthorized') {
        wrong.push(`${r.method} ${r.path} → ${res.status} ${body.slice(0, 120)}`);
      }
    }
    expect(wrong).to.deep.equal([]);
  });

  it('every route above analyst answers 403 naming the role to a lower role', async () => {
    const wrong: string[] = [];
    let checked = 0;
    for (const r of routes.filter((x) => x.requiredRole && x.requiredRole !== 'analyst')) {
      for (const role of ROLES.filter((x) => !roleAtLeast(x, r.requiredRole!))) {
        checked++;
        const res = await call(clients.get(role)!, r);
        const body = await res.text();
        const err = res.status === 403 ? apiErrorSchema.parse(JSON.parse(body)).error : undefined;
        // Stacked guards refuse at the first one the caller fails, so the role named may be a
        // lower one than the route's own (router needs operations, route needs admin).
        const named = /This needs the (\w+) role/.exec(err?.message ?? '')?.[1] as Role | undefined;
        if (!err || err.code !== 'forbidden' || !named || roleAtLeast(role, named)) {
          wrong.push(`${r.method} ${r.path} as ${role} → ${res.status} ${body.slice(0, 120)}`);
        }
      }
    }
    expect(checked).to.be.greaterThan(0);
    expect(wrong).to.deep.equal([]);
  });

  it('GET /api/users lists accounts for an admin', async () => {
    const { users } = userListResponseSchema.parse(await clients.get('admin')!.getJson('/api/users'));
    expect(users.map((u) => u.email)).to.include.members(['admin@demo.nullsmith', 'ops@demo.nullsmith', 'analyst@demo.nullsmith']);
    expect(JSON.stringify(users)).not.to.contain('scrypt');
  });
});
