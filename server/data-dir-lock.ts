import fs from 'node:fs';
import path from 'node:path';

/** Thrown when another live process (or server in this process) already uses the folder. */
export class DataDirBusyError extends Error {
  constructor(dir: string, pid: number) {
    super(
      `Another Nullsmith server (process ${pid}) is already using DATA_DIR ${dir}. The embedded database allows one owner: ` +
        'stop the other server, or give this one its own DATA_DIR, or use DATABASE_URL with a PostgreSQL server to run several nodes. ' +
        `If no Nullsmith server is running, delete ${path.join(dir, 'nullsmith.pid')}.`,
    );
    this.name = 'DataDirBusyError';
  }
}

const held = new Set<string>();

/**
 * Claims DATA_DIR for the embedded database with a pid file, because PGlite has no lock of
 * its own and two owners corrupt it. A file left by a process that no longer runs is taken
 * over. Returns the release function.
 */
export function lockDataDir(dir: string): () => void {
  fs.mkdirSync(dir, { recursive: true });
  const file = path.join(dir, 'nullsmith.pid');
  if (held.has(file)) throw new DataDirBusyError(dir, process.pid);
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      fs.writeFileSync(file, String(process.pid), { flag: 'wx' });
      held.add(file);
      return () => {
        held.delete(file);
        fs.rmSync(file, { force: true });
      };
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
      const owner = Number(fs.readFileSync(file, 'utf8').trim());
      if (owner && owner !== process.pid && alive(owner)) throw new DataDirBusyError(dir, owner);
      fs.rmSync(file, { force: true }); // stale: its process has gone (or it was ours and released)
    }
  }
  throw new Error(`Could not claim DATA_DIR ${dir}: remove ${file} if no Nullsmith server is running.`);
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}
