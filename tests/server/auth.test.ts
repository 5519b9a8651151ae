import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import { sessionResponseSchema } from '../../shared/api/auth.js';
import { apiErrorSchema } from '../../shared/api/error.js';
import { settings } from '../../server/db/schema/index.js';
import { startTestServer, TestClient, type TestServer } from './helpers/test-server.js';

const SID = 'nullsmith.sid';

describe('sign-in, session and sign-out', function () {
  this.timeout(180_000);
  let server: TestServer;
  before(async () => {
    server = await startTestServer();
  });
  after(async () => server?.close());

  it('signs in a demo account and returns the user without secrets', async () => {
    const c = server.client();
    const res = await c.post('/api/auth/login', { email: 'Analyst@Demo.Nullsmith ', password: 'nullsmith-analyst' });
    expect(res.status).to.equal(200);
    const raw = (await res.json()) as Record<string, Record<string, unknown>>;
    expect(raw.user).not.to.have.property('passwordHash');
    const { user } = sessionResponseSchema.parse(raw);
    expect(user).to.include({ email: 'analyst@demo.nullsmith', role: 'analyst' });
    const cookie = res.headers.getSetCookie().find((l) => l.startsWith(`${SID}=`))!;
    expect(cookie).to.match(/HttpOnly/i).and.match(/SameSite=Lax/i);
    expect(cookie).not.to.match(/Secure/i); // plain HTTP test server, COOKIE_SECURE=auto
  });

  it('refuses a wrong password and an unknown address with the same 401', async () => {
    for (const body of [
      { email: 'ops@demo.nullsmith', password: 'not-the-password' },
      { email: 'nobody@demo.nullsmith', password: 'nullsmith-ops' },
    ]) {
      const res = await server.client().post('/api/auth/login', body);
      expect(res.status).to.equal(401);
      expect(apiErrorSchema.parse(await res.json()).error).to.deep.equal({ code: 'invalid_credentials', message: 'E-mail or password is wrong.' });
    }
  });

  it('answers a malformed body with 400 naming the field', async () => {
    const c = server.client();
    let res = await c.post('/api/auth/login', { email: 'not-an-address', password: '' });
    expect(res.status).to.equal(400);
    const err = apiErrorSchema.parse(await res.json()).error;
    expect(err.code).to.equal('invalid_input');
    expect(err.details).to.deep.include({ path: 'email', message: 'Enter a valid e-mail address.' });
    expect(err.details).to.deep.include({ path: 'password', message: 'Enter your password.' });

    res = await c.post('/api/auth/login', '{"email": "a@b.c", ', { headers: { 'content-type': 'application/json' } });
    expect(res.status).to.equal(400);
    expect(apiErrorSchema.parse(await res.json()).error.code).to.equal('malformed_json');

    res = await c.post('/api/auth/login');
    expect(res.status).to.equal(400);
  });

  it('refuses a disabled account even with the right password', async () => {
    await server.createUser({ email: 'retired@demo.nullsmith', password: 'correct horse', role: 'analyst', disabled: true });
    const res = await server.client().post('/api/auth/login', { email: 'retired@demo.nullsmith', password: 'correct horse' });
    expect(res.status).to.equal(403);
    const err = apiErrorSchema.parse(await res.json()).error;
    expect(err.code).to.equal('account_disabled');
    expect(err.message).to.match(/administrator/);
  });

  it('GET /api/auth/me returns the user when signed in and 401 when not', async () => {
    const ops = await server.signIn('operations');
    const me = sessionResponseSchema.parse(await ops.getJson('/api/auth/me'));
    expect(me.user.role).to.equal('operations');
    const res = await server.client().get('/api/auth/me');
    expect(res.status).to.equal(401);
    expect(apiErrorSchema.parse(await res.json()).error.code).to.equal('unauthorized');
  });

  it('logout ends the session on the server, not just in the browser', async () => {
    const c = await server.signIn('analyst');
    const stolen = c.cookies.get(SID)!;
    const res = await c.post('/api/auth/logout');
    expect(res.status).to.equal(204);
    expect(c.cookies.has(SID)).to.equal(false);
    expect((await c.get('/api/auth/me')).status).to.equal(401);
    // replaying the old cookie does not bring the session back
    const replay = new TestClient(server.url);
    replay.cookies.set(SID, stolen);
    expect((await replay.get('/api/auth/me')).status).to.equal(401);
  });

  it('issues a new session id at sign-in (a planted or earlier session id is not reused)', async () => {
    const c = await server.signIn('analyst');
    const first = c.cookies.get(SID)!;
    const res = await c.post('/api/auth/login', { email: 'admin@demo.nullsmith', password: 'nullsmith-admin' });
    expect(res.status).to.equal(200);
    const second = c.cookies.get(SID)!;
    expect(second).to.be.a('string').and.not.equal(first);
    const old = new TestClient(server.url);
    old.cookies.set(SID, first);
    expect((await old.get('/api/auth/me')).status).to.equal(401);
  });

  it('drops the session of an account disabled after sign-in', async () => {
    const id = await server.createUser({ email: 'leaver@demo.nullsmith', password: 'pass-for-leaver', role: 'operations' });
    const c = await server.signIn({ email: 'leaver@demo.nullsmith', password: 'pass-for-leaver' });
    expect((await c.get('/api/auth/me')).status).to.equal(200);
    const { users } = await import('../../server/db/schema/index.js');
    await server.ctx.db.update(users).set({ disabled: true }).where(eq(users.id, id));
    expect((await c.get('/api/auth/me')).status).to.equal(401);
  });
});

describe('sign-in throttling', function () {
  this.timeout(180_000);
  let server: TestServer;
  before(async () => {
    server = await startTestServer();
  });
  after(async () => server?.close());

  it('locks an account for a while after 5 wrong passwords, with Retry-After and a clear message', async () => {
    // 5 failures per 15 minutes per account is common practice (OWASP Authentication Cheat Sheet, from memory).
    const c = server.client();
    for (let i = 0; i < 5; i++) {
      const res = await c.post('/api/auth/login', { email: 'ops@demo.nullsmith', password: `guess-${i}` });
      expect(res.status).to.equal(401);
    }
    const locked = await c.post('/api/auth/login', { email: 'ops@demo.nullsmith', password: 'nullsmith-ops' });
    expect(locked.status).to.equal(429);
    const retryAfter = Number(locked.headers.get('retry-after'));
    expect(retryAfter).to.be.within(1, 15 * 60);
    const err = apiErrorSchema.parse(await locked.json()).error;
    expect(err.code).to.equal('too_many_attempts');
    expect(err.message).to.match(/Wait 15 minutes and try again/);
    // other accounts from the same address still work
    expect((await c.post('/api/auth/login', { email: 'admin@demo.nullsmith', password: 'nullsmith-admin' })).status).to.equal(200);
  });

  it('locks an address after many failures across accounts', async () => {
    const c = server.client();
    let last = 0;
    for (let i = 0; i < 31 && last !== 429; i++) {
      const res = await c.post('/api/auth/login', { email: `spray-${i}@demo.nullsmith`, password: 'x' });
      last = res.status;
    }
    expect(last).to.equal(429);
  });
});

describe('sessions survive a restart on the same DATA_DIR', function () {
  this.timeout(300_000);
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-restart-'));
  after(() => fs.rmSync(dataDir, { recursive: true, force: true }));

  it('keeps the signed-in session and the generated secret', async () => {
    let server = await startTestServer({ dataDir });
    const c = await server.signIn('admin');
    const [secret] = await server.ctx.db.select().from(settings).where(eq(settings.key, 'session_secret'));
    expect(secret.value).to.be.a('string').with.length.greaterThan(40);
    await server.close();

    server = await startTestServer({ dataDir });
    try {
      c.baseUrl = server.url;
      const me = sessionResponseSchema.parse(await c.getJson('/api/auth/me'));
      expect(me.user.email).to.equal('admin@demo.nullsmith');
      const [again] = await server.ctx.db.select().from(settings).where(eq(settings.key, 'session_secret'));
      expect(again.value).to.equal(secret.value);
    } finally {
      await server.close();
    }
  });
});

describe('sign-in and sessions on PostgreSQL (scale-out mode)', function () {
  this.timeout(300_000);
  before(function () {
    if (!process.env.TEST_DATABASE_URL) this.skip(); // set by .ci/run, which starts a PostgreSQL server
  });

  it('signs in, keeps the session across a restart and reports the postgres driver', async () => {
    const { createTestDatabaseUrl } = await import('./helpers/queue-databases.js');
    const { url, drop } = await createTestDatabaseUrl();
    try {
      let server = await startTestServer({ env: { DATABASE_URL: url } });
      const c = await server.signIn('operations');
      const health = (await c.getJson('/api/health')) as { database: string };
      expect(health.database).to.equal('postgres');
      await server.close();
      server = await startTestServer({ env: { DATABASE_URL: url } });
      try {
        c.baseUrl = server.url;
        expect(sessionResponseSchema.parse(await c.getJson('/api/auth/me')).user.role).to.equal('operations');
        expect((await c.post('/api/auth/logout')).status).to.equal(204);
        expect((await c.get('/api/auth/me')).status).to.equal(401);
      } finally {
        await server.close();
      }
    } finally {
      await drop();
    }
  });
});
