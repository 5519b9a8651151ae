/**
 * Personal API tokens on a real server: shown once, stored only as a SHA-256 digest, accepted
 * as a Bearer header without CSRF, limited by scope, refused after expiry or revocation.
 */
import crypto from 'node:crypto';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import { apiTokens } from '../../server/db/schema/index.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';

describe('API tokens', function () {
  this.timeout(180_000);
  let server: TestServer;
  let analyst: TestClient;

  before(async () => {
    server = await startTestServer();
    analyst = await server.signIn('analyst');
  });
  after(() => server?.close());

  const create = async (scope: string, name = `${scope} script`) => {
    const res = await analyst.post('/api/tokens', { name, scope, expiresInDays: 7 });
    expect(res.status).to.equal(201);
    return (await res.json()) as { token: { id: number; prefix: string }; secret: string };
  };
  const bearer = (secret: string, path: string, init: RequestInit = {}) =>
    fetch(new URL(path, server.url), { ...init, headers: { ...(init.headers as Record<string, string>), authorization: `Bearer ${secret}` } });

  it('shows the secret once and stores only its digest', async () => {
    const { token, secret } = await create('read');
    expect(secret).to.match(/^nsk_[A-Za-z0-9_-]{43}$/);
    const [row] = await server.ctx.db.select().from(apiTokens).where(eq(apiTokens.id, token.id));
    // FIPS 180-4 SHA-256 through node:crypto as the independent digest
    expect(row.secretSha256).to.equal(crypto.createHash('sha256').update(secret).digest('hex'));
    expect(JSON.stringify(row)).not.to.include(secret.slice(4));
    const list = (await analyst.getJson('/api/tokens')) as { tokens: Record<string, unknown>[] };
    expect(JSON.stringify(list)).not.to.include(secret.slice(4));
    expect(list.tokens[0]).to.include({ prefix: token.prefix, status: 'active' });
  });

  it('read scope may look but not change, and needs no CSRF header', async () => {
    const { secret } = await create('read');
    const me = await bearer(secret, '/api/auth/me');
    expect(me.status).to.equal(200);
    expect(((await me.json()) as { user: { role: string } }).user.role).to.equal('analyst');
    const post = await bearer(secret, '/api/uploads', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: 'a.wav', sizeBytes: 1000, format: 'wav' }) });
    expect(post.status).to.equal(403);
    expect(((await post.json()) as { error: { message: string } }).error.message).to.match(/"read" scope/);
  });

  it('submit scope may change data but never accounts or tokens', async () => {
    const { secret } = await create('submit');
    const post = await bearer(secret, '/api/uploads', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: 'a.wav', sizeBytes: 1000, format: 'wav' }) });
    expect(post.status).to.equal(201); // no X-XSRF-TOKEN was sent
    const mint = await bearer(secret, '/api/tokens', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: 'more', scope: 'submit' }) });
    expect(mint.status).to.equal(403);
    expect(((await mint.json()) as { error: { message: string } }).error.message).to.match(/cannot change accounts, tokens or settings/);
  });

  it('refuses revoked, expired, unknown and malformed tokens with reasons', async () => {
    const { token, secret } = await create('read', 'to revoke');
    expect((await analyst.delete(`/api/tokens/${token.id}`)).status).to.equal(200);
    const revoked = await bearer(secret, '/api/auth/me');
    expect(revoked.status).to.equal(401);
    expect(((await revoked.json()) as { error: { code: string } }).error.code).to.equal('token_revoked');

    const old = await create('read', 'to expire');
    await server.ctx.db.update(apiTokens).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(apiTokens.id, old.token.id));
    const expired = await bearer(old.secret, '/api/auth/me');
    expect(expired.status).to.equal(401);
    expect(((await expired.json()) as { error: { message: string } }).error.message).to.match(/expired on/);

    expect((await bearer('nsk_' + 'A'.repeat(43), '/api/auth/me')).status).to.equal(401);
    const foreign = await bearer('ghx_notours', '/api/auth/me');
    expect(((await foreign.json()) as { error: { message: string } }).error.message).to.match(/not a Nullsmith API token/);
  });

  it('stops working when its account is disabled, and refuses bad requests to create', async () => {
    const { secret } = await create('read', 'owner disabled');
    const admin = await server.signIn('admin');
    const users = (await admin.getJson('/api/users')) as { users: { id: number; email: string }[] };
    const me = users.users.find((u) => u.email.startsWith('analyst@'))!;
    expect((await admin.patch(`/api/users/${me.id}`, { disabled: true })).status).to.equal(200);
    expect((await bearer(secret, '/api/auth/me')).status).to.equal(403);
    expect((await admin.patch(`/api/users/${me.id}`, { disabled: false })).status).to.equal(200);
    const again = await server.signIn('analyst');
    const bad = await again.post('/api/tokens', { name: '', scope: 'write', expiresInDays: 1000 });
    expect(bad.status).to.equal(400);
  });
});
