import type { AppConfig } from './config.js';

/**
 * Turns a start-up failure into one sentence saying what is wrong and what to do, for the
 * few failures a person can fix (ports, folders, database reachability); undefined otherwise.
 */
export function explainStartupError(err: unknown, config: AppConfig): string | undefined {
  // Drivers wrap the system error (Drizzle's failed-query error has it as `cause`, a refused
  // dual-stack connect is an AggregateError): look through the chain for the first we know.
  for (const e of errorChain(err)) {
    const text = explainOne(e, config);
    if (text) return text;
  }
  return undefined;
}

function errorChain(err: unknown): unknown[] {
  const out: unknown[] = [];
  const visit = (e: unknown, depth: number) => {
    if (!e || depth > 5 || out.includes(e)) return;
    out.push(e);
    if (e instanceof AggregateError) for (const inner of e.errors) visit(inner, depth + 1);
    if (e instanceof Error) visit(e.cause, depth + 1);
  };
  visit(err, 0);
  return out;
}

function explainOne(err: unknown, config: AppConfig): string | undefined {
  if (err instanceof Error && err.name === 'DataDirBusyError') return err.message;
  const e = err as NodeJS.ErrnoException & { syscall?: string; path?: string; address?: string; port?: number };
  const where = config.databaseUrl ? safeDbTarget(config.databaseUrl) : undefined;
  switch (e?.code) {
    case 'EADDRINUSE':
      return `Port ${config.port} on ${config.host} is already in use. Stop the other program or set PORT to a free port (0 picks one).`;
    case 'EADDRNOTAVAIL':
      return `HOST=${config.host} is not an address of this machine. Use 127.0.0.1, 0.0.0.0 or one of its interface addresses.`;
    case 'EACCES':
    case 'EPERM':
    case 'EROFS':
      if (e.syscall === 'listen') return `Not allowed to listen on ${config.host}:${config.port}. Use a port above 1023.`;
      return `Cannot write to ${e.path ?? config.dataDir}. Set DATA_DIR (and RESULTS_DIR) to a folder this user may write.`;
    case 'ENOSPC':
      return `The disk holding ${config.dataDir} is full. Free space or move DATA_DIR.`;
    case 'ECONNREFUSED':
    case 'ENOTFOUND':
    case 'ETIMEDOUT':
      if (where) return `Cannot reach the PostgreSQL server at ${where}. Check that it runs and DATABASE_URL is right.`;
      return undefined;
    case '28P01':
    case '28000':
      if (where) return `PostgreSQL at ${where} refused the user or password in DATABASE_URL. Correct them.`;
      return undefined;
    case '3D000':
      if (where) return `The database named in DATABASE_URL does not exist on ${where}. Create it first (createdb) or correct the URL.`;
      return undefined;
  }
  return undefined;
}

/** host:port/database of a postgres URL, without the password. */
function safeDbTarget(url: string): string {
  try {
    const u = new URL(url);
    return `${u.hostname}:${u.port || 5432}${u.pathname}`;
  } catch {
    return 'DATABASE_URL';
  }
}
