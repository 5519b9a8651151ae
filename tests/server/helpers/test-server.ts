/**
 * Real Nullsmith servers for tests: the same startServer() as production, on an ephemeral
 * port, with a temp DATA_DIR, talking real HTTP. Reuse it from any server test:
 *
 *   const server = await startTestServer();
 *   const ops = await server.signIn('operations');     // TestClient with cookies + CSRF header
 *   const res = await ops.post('/api/jobs', { ... });  // JSON in, Response out
 *   await server.close();
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { CSRF_COOKIE, CSRF_HEADER } from '../../../shared/api/auth.js';
import type { Role } from '../../../shared/roles.js';
import { DEMO_ACCOUNTS } from '../../../server/auth/demo-accounts.js';
import { hashPassword } from '../../../server/auth/password.js';
import { normalizeEmail } from '../../../server/auth/users.js';
import { loadConfig } from '../../../server/config.js';
import type { AppContext } from '../../../server/context.js';
import { users } from '../../../server/db/schema/index.js';
import { startServer, type RunningServer } from '../../../server/main.js';
import type { Logger } from '../../../server/logger.js';
import type { ServerPlugin } from '../../../server/plugins.js';

export interface TestServerOptions {
  /** Reuse a data folder (e.g. to restart on it). Given: the database lives on disk there and the folder is kept. */
  dataDir?: string;
  /** Extra environment variables for loadConfig (e.g. { DEMO_DATA: 'off' }). */
  env?: Record<string, string>;
  /** Plugins to run instead of the registered list (default: the registered list). */
  plugins?: ServerPlugin[];
  /** A logger of your own (e.g. to capture log lines); default: errors only, to stderr. */
  logger?: Logger;
  /** Force the database on disk in the temp DATA_DIR even without `dataDir` (default: in memory). */
  diskDatabase?: boolean;
}

export interface TestServer {
  url: string;
  dataDir: string;
  ctx: AppContext;
  /** A signed-out client (it picks up the CSRF cookie by itself on its first unsafe request). */
  client(): TestClient;
  /** A client signed in as the demo account of that role, or as the given account. */
  signIn(who: Role | { email: string; password: string }): Promise<TestClient>;
  /** Adds an account straight into the database (e.g. a disabled one) and returns its id. */
  createUser(u: { email: string; password: string; role: Role; displayName?: string; disabled?: boolean }): Promise<number>;
  /** Stops the server; removes the temp DATA_DIR unless it was passed in. */
  close(): Promise<void>;
}

export async function startTestServer(opts: TestServerOptions = {}): Promise<TestServer> {
  const ownDir = !opts.dataDir;
  const dataDir = opts.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-test-'));
  const config = loadConfig({
    NODE_ENV: 'test',
    PORT: '0',
    HOST: '127.0.0.1',
    DATA_DIR: dataDir,
    LOG_LEVEL: 'error',
    DEMO_DATA: 'on',
    WORKER_CONCURRENCY: '1',
    ...opts.env,
  });
  let running: RunningServer;
  try {
    running = await startServer(config, { plugins: opts.plugins, logger: opts.logger, memoryDatabase: ownDir && !opts.diskDatabase });
  } catch (err) {
    if (ownDir) fs.rmSync(dataDir, { recursive: true, force: true });
    throw err;
  }
  const { url, ctx } = running;
  return {
    url,
    dataDir,
    ctx,
    client: () => new TestClient(url),
    async signIn(who) {
      const account = typeof who === 'string' ? DEMO_ACCOUNTS.find((a) => a.role === who)! : who;
      const c = new TestClient(url);
      const res = await c.post('/api/auth/login', { email: account.email, password: account.password });
      if (res.status !== 200) throw new Error(`test sign-in as ${account.email} failed: ${res.status} ${await res.text()}`);
      return c;
    },
    async createUser(u) {
      const [row] = await ctx.db
        .insert(users)
        .values({
          email: normalizeEmail(u.email),
          displayName: u.displayName ?? u.email,
          role: u.role,
          passwordHash: await hashPassword(u.password),
          disabled: u.disabled ?? false,
        })
        .returning({ id: users.id });
      return row.id;
    },
    async close() {
      await running.close();
      if (ownDir) fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

type JsonBody = unknown;

/**
 * fetch with a cookie jar, like a browser tab: keeps the session and XSRF-TOKEN cookies and
 * sends the X-XSRF-TOKEN header on POST/PUT/PATCH/DELETE (fetching the cookie first when it
 * has none yet). `csrf: false` in init sends an unsafe request without the header.
 */
export class TestClient {
  readonly cookies = new Map<string, string>();

  constructor(public baseUrl: string) {}

  async fetch(pathname: string, init: RequestInit & { csrf?: boolean } = {}): Promise<Response> {
    const method = (init.method ?? 'GET').toUpperCase();
    const headers = new Headers(init.headers);
    const unsafe = !['GET', 'HEAD', 'OPTIONS'].includes(method);
    if (unsafe && init.csrf !== false) {
      if (!this.cookies.has(CSRF_COOKIE)) await this.fetch('/api/health');
      headers.set(CSRF_HEADER, this.cookies.get(CSRF_COOKIE) ?? '');
    }
    if (this.cookies.size) headers.set('cookie', [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; '));
    const res = await fetch(new URL(pathname, this.baseUrl), { ...init, method, headers, redirect: 'manual' });
    this.store(res.headers.getSetCookie());
    return res;
  }

  get(pathname: string, init: RequestInit = {}): Promise<Response> {
    return this.fetch(pathname, { ...init, method: 'GET' });
  }
  post(pathname: string, body?: JsonBody, init: RequestInit & { csrf?: boolean } = {}): Promise<Response> {
    return this.send('POST', pathname, body, init);
  }
  put(pathname: string, body?: JsonBody, init: RequestInit & { csrf?: boolean } = {}): Promise<Response> {
    return this.send('PUT', pathname, body, init);
  }
  patch(pathname: string, body?: JsonBody, init: RequestInit & { csrf?: boolean } = {}): Promise<Response> {
    return this.send('PATCH', pathname, body, init);
  }
  delete(pathname: string, init: RequestInit & { csrf?: boolean } = {}): Promise<Response> {
    return this.fetch(pathname, { ...init, method: 'DELETE' });
  }

  /** GET and parse JSON, failing loudly with the body when the status is not the expected one. */
  async getJson<T = unknown>(pathname: string, expectStatus = 200): Promise<T> {
    const res = await this.get(pathname);
    const text = await res.text();
    if (res.status !== expectStatus) throw new Error(`GET ${pathname}: expected ${expectStatus}, got ${res.status}: ${text}`);
    return JSON.parse(text) as T;
  }

  private send(method: string, pathname: string, body: JsonBody, init: RequestInit & { csrf?: boolean }): Promise<Response> {
    const headers = new Headers(init.headers);
    if (body !== undefined && !headers.has('content-type')) headers.set('content-type', 'application/json');
    return this.fetch(pathname, {
      ...init,
      method,
      headers,
      body: body === undefined ? undefined : typeof body === 'string' || body instanceof Uint8Array ? (body as NonNullable<RequestInit['body']>) : JSON.stringify(body),
    });
  }

  private store(setCookies: string[]): void {
    for (const line of setCookies) {
      const [pair, ...attrs] = line.split(';');
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      const expired = attrs.some((a) => {
        const [k, v] = a.trim().split('=');
        return k.toLowerCase() === 'expires' && Date.parse(v) <= Date.now();
      });
      if (!value || expired) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
  }
}

/** The demo password of a role (for tests that sign in by hand). */
export const demoAccount = (role: Role) => DEMO_ACCOUNTS.find((a) => a.role === role)!;

/** Signs a fresh client in with a demo account on a server started elsewhere (a separate process). */
export async function signInDemo(url: string, role: Role = 'analyst'): Promise<TestClient> {
  const c = new TestClient(url);
  const a = demoAccount(role);
  const res = await c.post('/api/auth/login', { email: a.email, password: a.password });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${await res.text()}`);
  return c;
}
