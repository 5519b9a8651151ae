/**
 * Account administration and run-time settings on a real server: create and invite (the
 * one-time link arrives in the Outbox over SMTP and works once), role changes, disabling,
 * password resets, the last-admin safeguard, settings validation and live effect.
 */
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import { mailMessages, users } from '../../server/db/schema/index.js';
import { recordingKit } from '../../server/recordings/recording-kit.js';
import { demoAccount, startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';

describe('admin: accounts', function () {
  this.timeout(180_000);
  let server: TestServer;
  let admin: TestClient;

  before(async () => {
    server = await startTestServer();
    admin = await server.signIn('admin');
  });
  after(() => server?.close());

  const userId = async (email: string) => (await server.ctx.db.select().from(users).where(eq(users.email, email)))[0].id;

  it('creates an account with a password that can sign in at once', async () => {
    const res = await admin.post('/api/users', { email: 'Tern.Survey@example.org', displayName: 'Tern Survey', role: 'analyst', password: 'a-long-enough-secret' });
    expect(res.status).to.equal(201);
    const body = (await res.json()) as { user: { email: string; role: string } };
    expect(body.user).to.include({ email: 'tern.survey@example.org', role: 'analyst' });
    await server.signIn({ email: 'tern.survey@example.org', password: 'a-long-enough-secret' });
  });

  it('refuses a duplicate e-mail and a short password with clear messages', async () => {
    const dup = await admin.post('/api/users', { email: 'tern.survey@example.org', displayName: 'Again', role: 'analyst', password: 'a-long-enough-secret' });
    expect(dup.status).to.equal(409);
    expect(((await dup.json()) as { error: { message: string } }).error.message).to.match(/already exists/);
    const short = await admin.post('/api/users', { email: 'x@example.org', displayName: 'X', role: 'analyst', password: 'short' });
    expect(short.status).to.equal(400);
    expect(((await short.json()) as { error: { message: string } }).error.message).to.match(/at least 12 characters/);
  });

  it('invites by mail: the one-time link sets the password once', async () => {
    const res = await admin.post('/api/users', { email: 'petrel@example.org', displayName: 'Petrel Ops', role: 'operations' });
    expect(res.status).to.equal(201);
    const body = (await res.json()) as { mailed: boolean; link: string };
    expect(body.mailed).to.equal(true);
    const [msg] = (await server.ctx.db.select().from(mailMessages)).filter((m) => m.envelopeTo.includes('petrel@example.org'));
    expect(msg.subject).to.match(/invited/);
    const link = /\/set-password\/(nsl_[A-Za-z0-9_-]+)/.exec(msg.textBody)![1];
    expect(msg.textBody).to.include(`${server.url}/set-password/`); // the real port, also when PORT=0
    const anon = server.client();
    expect(((await anon.getJson(`/api/account-links/${link}`)) as { email: string }).email).to.equal('petrel@example.org');
    const use = await anon.post(`/api/account-links/${link}`, { password: 'petrel-password-1' });
    expect(use.status).to.equal(204);
    await server.signIn({ email: 'petrel@example.org', password: 'petrel-password-1' });
    const again = await anon.post(`/api/account-links/${link}`, { password: 'petrel-password-2' });
    expect(again.status).to.equal(410);
  });

  it('changes a role and disabling ends the sessions at once', async () => {
    const id = await userId('tern.survey@example.org');
    const tern = await server.signIn({ email: 'tern.survey@example.org', password: 'a-long-enough-secret' });
    expect((await admin.patch(`/api/users/${id}`, { role: 'operations' })).status).to.equal(200);
    expect(((await tern.getJson('/api/auth/me')) as { user: { role: string } }).user.role).to.equal('operations');
    expect((await admin.patch(`/api/users/${id}`, { disabled: true })).status).to.equal(200);
    expect((await tern.get('/api/auth/me')).status).to.equal(401);
    const login = await server.client().post('/api/auth/login', { email: 'tern.survey@example.org', password: 'a-long-enough-secret' });
    expect(login.status).to.equal(403);
  });

  it('never removes the last enabled admin', async () => {
    const adminId = await userId(demoAccount('admin').email);
    const demote = await admin.patch(`/api/users/${adminId}`, { role: 'analyst' });
    expect(demote.status).to.equal(409);
    expect(((await demote.json()) as { error: { message: string } }).error.message).to.match(/last enabled administrator/);
    expect((await admin.patch(`/api/users/${adminId}`, { disabled: true })).status).to.equal(409);
    // with a second admin the change is allowed
    const second = await admin.post('/api/users', { email: 'skua@example.org', displayName: 'Skua Admin', role: 'admin', password: 'skua-admin-password' });
    expect(second.status).to.equal(201);
    const skua = await server.signIn({ email: 'skua@example.org', password: 'skua-admin-password' });
    expect((await skua.patch(`/api/users/${adminId}`, { role: 'operations' })).status).to.equal(200);
    const skuaId = await userId('skua@example.org');
    expect((await skua.patch(`/api/users/${skuaId}`, { role: 'analyst' })).status).to.equal(409);
    expect((await skua.patch(`/api/users/${adminId}`, { role: 'admin' })).status).to.equal(200);
  });

  it('resets a password: set directly, or a link through the Outbox', async () => {
    const id = await userId(demoAccount('analyst').email);
    const analyst = await server.signIn('analyst');
    const set = await admin.post(`/api/users/${id}/reset-password`, { password: 'analyst-new-password' });
    expect(set.status).to.equal(200);
    expect((await analyst.get('/api/auth/me')).status).to.equal(401); // sessions ended
    await server.signIn({ email: demoAccount('analyst').email, password: 'analyst-new-password' });
    const viaLink = await admin.post(`/api/users/${id}/reset-password`, {});
    expect(((await viaLink.json()) as { mailed: boolean }).mailed).to.equal(true);
  });

  it('refuses unknown fields and analysts', async () => {
    const id = await userId(demoAccount('analyst').email);
    const res = await admin.patch(`/api/users/${id}`, { passwordHash: 'x' });
    expect(res.status).to.equal(400);
    expect(((await res.json()) as { error: { message: string } }).error.message).to.match(/Only role, disabled and displayName/);
    const ops = await server.signIn('operations');
    expect((await ops.get('/api/users')).status).to.equal(403);
  });
});

describe('admin: settings', function () {
  this.timeout(180_000);
  let server: TestServer;
  let admin: TestClient;

  before(async () => {
    server = await startTestServer();
    admin = await server.signIn('admin');
  });
  after(() => server?.close());

  it('applies upload limits and concurrency without a restart', async () => {
    const res = await admin.patch('/api/settings', { maxUploadBytes: 5 * 1024 ** 2, userQuotaBytes: 50 * 1024 ** 2, workerConcurrency: 2, resultRetentionDays: 30 });
    expect(res.status).to.equal(200);
    const body = (await res.json()) as { settings: Record<string, number>; sources: Record<string, string> };
    expect(body.settings).to.include({ maxUploadBytes: 5 * 1024 ** 2, workerConcurrency: 2, resultRetentionDays: 30 });
    expect(body.sources.maxUploadBytes).to.equal('admin');
    expect(recordingKit(server.ctx).limits.maxFileBytes).to.equal(5 * 1024 ** 2);
    const analyst = await server.signIn('analyst');
    const big = await analyst.post('/api/uploads', { name: 'big.wav', sizeBytes: 6 * 1024 ** 2, format: 'wav' });
    expect(big.status).to.equal(413);
    expect(((await big.json()) as { error: { message: string } }).error.message).to.match(/largest file this server accepts is 5\.0 MiB/);
  });

  it('refuses bad values, naming the setting, and keeps the stored ones', async () => {
    for (const [patch, pattern] of [
      [{ workerConcurrency: 0 }, /at least 1/],
      [{ resultRetentionDays: -1 }, /0 \(keep for ever\)/],
      [{ maxUploadBytes: 100 * 1024 ** 2 }, /cannot be larger than the per-user quota/],
      [{ colour: 'blue' }, /Unknown setting colour/],
    ] as const) {
      const res = await admin.patch('/api/settings', patch);
      expect(res.status, JSON.stringify(patch)).to.equal(400);
      expect(((await res.json()) as { error: { message: string } }).error.message).to.match(pattern);
    }
    const now = (await admin.getJson('/api/settings')) as { settings: Record<string, number> };
    expect(now.settings).to.include({ maxUploadBytes: 5 * 1024 ** 2, workerConcurrency: 2, resultRetentionDays: 30 });
  });
});
