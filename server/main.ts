import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { pathToFileURL } from 'node:url';
import { createApp } from './app.js';
import { authKit } from './auth/auth-kit.js';
import { seedDemoAccounts } from './auth/demo-accounts.js';
import { ensureSessionSecret } from './auth/session-secret.js';
import { ConfigError, loadConfig, type AppConfig } from './config.js';
import type { AppContext } from './context.js';
import { openDatabase } from './db/client.js';
import { lockDataDir } from './data-dir-lock.js';
import { createLogger, type Logger } from './logger.js';
import { serverPlugins, type ServerPlugin } from './plugins.js';
import { explainStartupError } from './startup-errors.js';

export interface RunningServer {
  /** e.g. http://127.0.0.1:41234 (the real port when PORT=0). */
  url: string;
  ctx: AppContext;
  server: http.Server;
  /** Stops accepting, ends open connections, stops plugins (ws, compute, node), closes the database. Idempotent. */
  close(): Promise<void>;
}

export interface StartOptions {
  /** Defaults to the registered list in plugins.ts. */
  plugins?: ServerPlugin[];
  logger?: Logger;
  /** Tests: a throw-away in-memory PGlite instead of DATA_DIR/db (files still go under DATA_DIR). */
  memoryDatabase?: boolean;
}

const SESSION_PRUNE_MS = 60 * 60_000;
/** Keep-alive connections get this long to finish in-flight requests at shutdown. */
const DRAIN_MS = 5_000;

/** Opens the database, prepares secrets and demo accounts, starts plugins, listens. */
export async function startServer(config: AppConfig, options: StartOptions = {}): Promise<RunningServer> {
  const logger = options.logger ?? createLogger(config);
  const plugins = options.plugins ?? serverPlugins;
  const inMemory = Boolean(options.memoryDatabase && !config.databaseUrl);
  // The embedded database on disk has exactly one owner: claim the folder before opening it.
  const unlock = config.databaseUrl || inMemory ? () => undefined : lockDataDir(config.dataDir);
  let database: Awaited<ReturnType<typeof openDatabase>>;
  try {
    database = await openDatabase({ dataDir: inMemory ? 'memory://' : config.dataDir, databaseUrl: config.databaseUrl });
  } catch (err) {
    unlock();
    throw err;
  }
  logger.info(`database ready (${database.kind}${inMemory ? ', in memory' : ''})`);
  const started: ServerPlugin[] = [];
  let server: http.Server | undefined;
  let ctx: AppContext | undefined;
  try {
    const sessionSecret = await ensureSessionSecret(database.db, config.sessionSecret);
    if (config.demoData) await seedDemoAccounts(database.db, logger);
    ctx = { config, db: database.db, dbKind: database.kind, logger, sessionSecret, services: {}, startedAt: Date.now() };

    for (const p of plugins) {
      await p.start?.(ctx);
      started.push(p);
    }
    const app = createApp(ctx);
    const httpServer = http.createServer(app);
    server = httpServer;
    for (const p of plugins) await p.attach?.(ctx, httpServer);
    await listen(httpServer, config.port, config.host);
    const { port } = httpServer.address() as AddressInfo;
    const url = `http://${config.host.includes(':') ? `[${config.host}]` : config.host}:${port}`;
    const store = authKit(ctx).store;
    store.startPruning(SESSION_PRUNE_MS, (err) => logger.warn('could not prune expired sessions', { error: String(err) }));
    const running = ctx;

    let closing: Promise<void> | undefined;
    const close = () =>
      (closing ??= (async () => {
        const drained = new Promise<void>((resolve) => httpServer.close(() => resolve()));
        httpServer.closeIdleConnections();
        const force = setTimeout(() => httpServer.closeAllConnections(), DRAIN_MS);
        await drained;
        clearTimeout(force);
        store.stopPruning();
        await stopPlugins(started, running, logger);
        await database.close();
        unlock();
      })());
    return { url, ctx: running, server: httpServer, close };
  } catch (err) {
    server?.close();
    if (ctx) await stopPlugins(started, ctx, logger);
    await database.close().catch(() => undefined);
    unlock();
    throw err;
  }
}

async function stopPlugins(started: ServerPlugin[], ctx: AppContext, logger: Logger): Promise<void> {
  for (const p of [...started].reverse()) {
    try {
      await p.stop?.(ctx);
    } catch (err) {
      logger.error(`plugin ${p.name} did not stop cleanly`, { error: String(err) });
    }
  }
}

function listen(server: http.Server, port: number, host: string): Promise<void> {
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
}

/** Command-line entry: `node --import tsx server/main.ts`. */
async function main(): Promise<void> {
  let config: AppConfig;
  try {
    config = loadConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(err.message);
      process.exit(1);
    }
    throw err;
  }
  const logger = createLogger(config);
  let running: RunningServer;
  try {
    running = await startServer(config, { logger });
  } catch (err) {
    const explained = explainStartupError(err, config);
    if (explained) logger.error(`Nullsmith could not start: ${explained}`);
    else logger.error('Nullsmith could not start', { error: err instanceof Error ? (err.stack ?? err.message) : String(err) });
    process.exit(1);
  }
  console.log(`Nullsmith listening on ${running.url}`);

  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) {
      logger.warn(`${signal} again: exiting without finishing shutdown`);
      process.exit(1);
    }
    stopping = true;
    logger.info(`${signal}: shutting down`);
    running.close().then(
      () => process.exit(0),
      (err: unknown) => {
        logger.error('shutdown failed', { error: String(err) });
        process.exit(1);
      },
    );
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
}

// No top-level await: keeps this module loadable from any loader tests or tools use.
if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  main().catch((err: unknown) => {
    console.error(err instanceof Error ? (err.stack ?? err.message) : String(err));
    process.exit(1);
  });
}
