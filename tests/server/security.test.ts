import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Writable } from 'node:stream';
import { expect } from 'chai';
import express from 'express';
import winston from 'winston';
import { z } from 'zod';
import { apiErrorSchema } from '../../shared/api/error.js';
import { clientFiles } from '../../server/http/client-files.js';
import { errorHandler } from '../../server/http/error-handler.js';
import { badRequest } from '../../server/http/http-error.js';
import { startTestServer, TestClient, type TestServer } from './helpers/test-server.js';

/** A winston logger that keeps every line it is given, at debug level. */
function capturingLogger(): { logger: winston.Logger; lines: string[] } {
  const lines: string[] = [];
  const stream = new Writable({
    write(chunk: Buffer, _enc, cb) {
      lines.push(chunk.toString());
      cb();
    },
  });
  const logger = winston.createLogger({ level: 'debug', format: winston.format.json(), transports: [new winston.transports.Stream({ stream })] });
  return { logger, lines };
}

describe('HTTP security: headers, CSRF, errors, logs', function () {
  this.timeout(180_000);
  let server: TestServer;
  const captured = capturingLogger();
  before(async () => {
    server = await startTestServer({ logger: captured.logger });
  });
  after(async () => server?.close());

  it('sends security headers with a Content-Security-Policy that allows only our own scripts', async () => {
    const res = await server.client().get('/api/health');
    const csp = res.headers.get('content-security-policy') ?? '';
    // Directive names per W3C Content Security Policy Level 3 (2023 working draft).
    expect(csp).to.contain("default-src 'self'");
    expect(csp).to.contain("script-src 'self'");
    expect(csp).not.to.match(/script-src[^;]*unsafe-(inline|eval)/);
    expect(csp).to.contain("frame-ancestors 'none'");
    expect(csp).to.contain("object-src 'none'");
    expect(csp).to.contain("connect-src 'self'");
    expect(res.headers.get('x-content-type-options')).to.equal('nosniff');
    expect(res.headers.get('x-frame-options')).to.equal('DENY');
    expect(res.headers.get('referrer-policy')).to.equal('no-referrer');
    expect(res.headers.get('x-powered-by')).to.equal(null);
    // plain-HTTP deployment: no HSTS, no upgrade of sub-requests
    expect(res.headers.get('strict-transport-security')).to.equal(null);
    expect(csp).not.to.contain('upgrade-insecure-requests');
  });

  it('hands out a script-readable XSRF-TOKEN cookie once', async () => {
    const c = server.client();
    const res = await c.get('/api/health');
    const line = res.headers.getSetCookie().find((l) => l.startsWith('XSRF-TOKEN='))!;
    expect(line).to.match(/SameSite=Lax/i);
    expect(line).not.to.match(/HttpOnly/i);
    expect(c.cookies.get('XSRF-TOKEN')).to.have.length.greaterThan(30);
    const again = await c.get('/api/health');
    expect(again.headers.getSetCookie().some((l) => l.startsWith('XSRF-TOKEN='))).to.equal(false);
  });

  it('refuses state-changing requests without a matching X-XSRF-TOKEN header', async () => {
    const c = await server.signIn('admin');
    for (const init of [{ csrf: false }, { csrf: false, headers: { 'x-xsrf-token': 'forged-token-forged-token-forged' } }]) {
      const res = await c.post('/api/auth/logout', undefined, init);
      expect(res.status).to.equal(403);
      const err = apiErrorSchema.parse(await res.json()).error;
      expect(err.code).to.equal('csrf');
      expect(err.message).to.match(/Reload the page/);
    }
    // still signed in: the refused logout did nothing
    expect((await c.get('/api/auth/me')).status).to.equal(200);
    // a first-time caller without the cookie is refused too, and gets the cookie for its retry
    const fresh = new TestClient(server.url);
    const res = await fresh.post('/api/auth/login', { email: 'admin@demo.nullsmith', password: 'nullsmith-admin' }, { csrf: false });
    expect(res.status).to.equal(403);
    expect(fresh.cookies.has('XSRF-TOKEN')).to.equal(true);
    expect((await fresh.post('/api/auth/login', { email: 'admin@demo.nullsmith', password: 'nullsmith-admin' })).status).to.equal(200);
  });

  it('exempts Bearer-token requests (no ambient cookie authority) from the CSRF check', async () => {
    const res = await fetch(`${server.url}/api/auth/login`, {
      method: 'POST',
      headers: { authorization: 'Bearer not-a-real-token', 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'nobody@demo.nullsmith', password: 'x' }),
    });
    expect(res.status).to.equal(401);
  });

  it('answers unknown API paths with a JSON 404 and oversized bodies with 413', async () => {
    const c = server.client();
    let res = await c.get('/api/no-such-thing?token=abc');
    expect(res.status).to.equal(404);
    const err = apiErrorSchema.parse(await res.json()).error;
    expect(err).to.include({ code: 'not_found' });
    expect(err.message).to.contain('GET /api/no-such-thing');
    expect(err.message).not.to.contain('token=abc');

    res = await c.post('/api/auth/login', { email: 'a@b.c', password: 'x'.repeat(2 * 1024 * 1024) });
    expect(res.status).to.equal(413);
    expect(apiErrorSchema.parse(await res.json()).error.code).to.equal('too_large');
  });

  it('never writes passwords, cookies or CSRF tokens to the log', async () => {
    const secret = 'hunter2-secret-value';
    const c = server.client();
    await c.post('/api/auth/login', { email: 'ops@demo.nullsmith', password: secret });
    const admin = await server.signIn('admin');
    await admin.get('/api/users');
    const log = captured.lines.join('');
    expect(log).to.contain('POST /api/auth/login 401');
    expect(log).to.match(/GET \/api\/users 200 [\d.]+ms/);
    expect(log).not.to.contain(secret);
    expect(log).not.to.contain('nullsmith-admin');
    for (const value of [...c.cookies.values(), ...admin.cookies.values()]) expect(log).not.to.contain(value);
  });
});

describe('JSON error handler', function () {
  this.timeout(60_000);
  const captured = capturingLogger();
  let url: string;
  let close: () => void;
  before(async () => {
    const app = express();
    app.use(express.json());
    app.get('/boom', () => {
      throw new Error('connection string postgres://secret@db');
    });
    app.get('/zod', () => {
      z.object({ look: z.object({ bearingDeg: z.number().max(180, 'must be at most 180°') }) }).parse({ look: { bearingDeg: 200 } });
    });
    app.get('/http', () => {
      throw badRequest('Pick a recording first.', { field: 'recordingId' });
    });
    app.use(errorHandler(captured.logger));
    const srv = app.listen(0, '127.0.0.1');
    await new Promise((r) => srv.once('listening', r));
    const addr = srv.address() as { port: number };
    url = `http://127.0.0.1:${addr.port}`;
    close = () => srv.close();
  });
  after(() => close?.());

  it('turns unknown errors into a generic 500 and keeps the details in the log only', async () => {
    const res = await fetch(`${url}/boom`);
    expect(res.status).to.equal(500);
    const text = await res.text();
    expect(text).not.to.contain('secret');
    expect(text).not.to.match(/\n\s+at /);
    expect(apiErrorSchema.parse(JSON.parse(text)).error.code).to.equal('internal');
    expect(captured.lines.join('')).to.contain('postgres://secret@db');
  });

  it('turns zod errors into 400 with field paths', async () => {
    const res = await fetch(`${url}/zod`);
    expect(res.status).to.equal(400);
    const err = apiErrorSchema.parse(await res.json()).error;
    expect(err.code).to.equal('invalid_input');
    expect(err.details).to.deep.equal([{ path: 'look.bearingDeg', message: 'must be at most 180°' }]);
    expect(err.message).to.contain('look.bearingDeg');
  });

  it('passes HttpError status, code, message and details through', async () => {
    const res = await fetch(`${url}/http`);
    expect(res.status).to.equal(400);
    expect(await res.json()).to.deep.equal({ error: { code: 'bad_request', message: 'Pick a recording first.', details: { field: 'recordingId' } } });
  });
});

describe('built client and SPA fallback', function () {
  this.timeout(60_000);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-client-'));
  let url: string;
  let close: () => void;
  before(async () => {
    const app = express();
    app.use(clientFiles(dir));
    const srv = app.listen(0, '127.0.0.1');
    await new Promise((r) => srv.once('listening', r));
    url = `http://127.0.0.1:${(srv.address() as { port: number }).port}`;
    close = () => srv.close();
  });
  after(() => {
    close?.();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('says how to build the client when it is missing', async () => {
    const res = await fetch(`${url}/jobs/42`);
    expect(res.status).to.equal(503);
    expect(await res.text()).to.contain('npm run build:client');
  });

  it('serves hashed bundles with a long cache and deep links with index.html', async () => {
    fs.writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>Nullsmith</title>');
    fs.writeFileSync(path.join(dir, 'main-ABCD1234.js'), 'console.log(1)');
    let res = await fetch(`${url}/main-ABCD1234.js`);
    expect(res.headers.get('cache-control')).to.contain('immutable');
    res = await fetch(`${url}/jobs/42/results`);
    expect(res.status).to.equal(200);
    expect(res.headers.get('cache-control')).to.equal('no-cache');
    expect(await res.text()).to.contain('<title>Nullsmith</title>');
  });
});
