import { desc, gt, inArray, lt, or, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { liveChanges } from '../db/schema/live-changes.js';

/** What changed since the last poll, deduplicated: job ids, node ids, and whether the queue switches moved. */
export interface ChangeBatch {
  jobIds: number[];
  nodeIds: string[];
  queue: boolean;
}

export interface ChangeFeedOptions {
  db: AppDb;
  dbKind: 'pglite' | 'postgres';
  /** Safety-net poll when no NOTIFY or in-process event arrives. */
  pollMs?: number;
  /** A sequence gap older than this is taken as a rolled-back transaction and forgotten. */
  gapTtlMs?: number;
  /** Rows older than this are deleted (once a minute). */
  keepMs?: number;
  onBatch(batch: ChangeBatch): Promise<void> | void;
  onError(error: Error): void;
}

export const LIVE_NOTIFY_CHANNEL = 'nullsmith_live';

/**
 * Reads the live_changes log (written by triggers, so changes from every process on this
 * database arrive) and hands each batch to the hub. Woken by NOTIFY (PGlite's in-process
 * listener, or a dedicated PostgreSQL connection) and by wake() from in-process queue events,
 * with a slow poll as a safety net.
 *
 * Ids come from a sequence, and on PostgreSQL a transaction that took id 7 may commit after
 * one that took id 8. So the feed remembers ids skipped below its cursor for a few seconds and
 * asks for them again; a gap that never fills was a rolled-back transaction.
 */
export class ChangeFeed {
  private cursor = 0;
  private readonly gaps = new Map<number, number>();
  private timer: NodeJS.Timeout | undefined;
  private pruneTimer: NodeJS.Timeout | undefined;
  private polling = false;
  private again = false;
  private stopped = false;
  private unlisten: (() => Promise<void>) | undefined;
  private listenConn: PgListenClient | undefined;
  private relistenTimer: NodeJS.Timeout | undefined;
  /** Listening connections already handed back to the pool (release twice throws). */
  private readonly releasedConns = new WeakSet<PgListenClient>();

  constructor(private readonly o: ChangeFeedOptions) {}

  async start(): Promise<void> {
    const [last] = await this.o.db.select({ id: liveChanges.id }).from(liveChanges).orderBy(desc(liveChanges.id)).limit(1);
    this.cursor = last?.id ?? 0;
    this.unlisten = await this.listen().catch((e: unknown) => {
      this.o.onError(new Error(`LISTEN ${LIVE_NOTIFY_CHANNEL} failed (${(e as Error).message}); live updates fall back to polling`));
      return undefined;
    });
    this.timer = setInterval(() => this.wake(), this.o.pollMs ?? 1000);
    this.pruneTimer = setInterval(() => void this.prune(), 60_000);
  }

  async stop(): Promise<void> {
    this.stopped = true;
    clearInterval(this.timer);
    clearInterval(this.pruneTimer);
    await this.unlisten?.().catch(() => undefined);
  }

  /** Poll now (coalesced: a wake during a poll runs one more poll after it). */
  wake(): void {
    if (this.stopped) return;
    if (this.polling) {
      this.again = true;
      return;
    }
    this.polling = true;
    void (async () => {
      try {
        do {
          this.again = false;
          await this.poll();
        } while (this.again && !this.stopped);
      } catch (e) {
        this.o.onError(e as Error);
      } finally {
        this.polling = false;
      }
    })();
  }

  private async poll(): Promise<void> {
    const now = Date.now();
    const ttl = this.o.gapTtlMs ?? 10_000;
    for (const [id, seen] of this.gaps) if (now - seen > ttl) this.gaps.delete(id);
    const gapIds = [...this.gaps.keys()];
    const cond = gapIds.length ? or(gt(liveChanges.id, this.cursor), inArray(liveChanges.id, gapIds)) : gt(liveChanges.id, this.cursor);
    const rows = await this.o.db.select().from(liveChanges).where(cond).orderBy(liveChanges.id).limit(2000);
    if (!rows.length) return;
    const jobIds = new Set<number>();
    const nodeIds = new Set<string>();
    let queue = false;
    for (const r of rows) {
      if (this.gaps.delete(r.id)) {
        // a late commit below the cursor: take it, the cursor stays
      } else if (r.id > this.cursor) {
        // remember skipped ids (cap: a burst of rollbacks must not grow this without bound)
        for (let k = this.cursor + 1; k < r.id && this.gaps.size < 10_000; k++) this.gaps.set(k, now);
        this.cursor = r.id;
      }
      if (r.topic === 'job') jobIds.add(Number(r.ref));
      else if (r.topic === 'node') nodeIds.add(r.ref);
      else if (r.topic === 'queue') queue = true;
    }
    if (rows.length === 2000) this.again = true;
    await this.o.onBatch({ jobIds: [...jobIds], nodeIds: [...nodeIds], queue });
  }

  private async prune(): Promise<void> {
    const keep = this.o.keepMs ?? 5 * 60_000;
    await this.o.db
      .delete(liveChanges)
      .where(lt(liveChanges.at, sql`now() - ${keep} * interval '1 millisecond'`))
      .catch((e: unknown) => this.o.onError(e as Error));
  }

  /** NOTIFY wake-ups: PGlite delivers them in-process; PostgreSQL needs a connection of its own. */
  private async listen(): Promise<() => Promise<void>> {
    const client = (this.o.db as unknown as { $client: unknown }).$client;
    if (this.o.dbKind === 'pglite') {
      const pglite = client as { listen(channel: string, cb: (payload: string) => void): Promise<() => Promise<void>> };
      return pglite.listen(LIVE_NOTIFY_CHANNEL, () => this.wake());
    }
    const pool = client as PgListenPool;
    await this.listenOnPostgres(pool).catch((e: unknown) => {
      // PostgreSQL not reachable for LISTEN right now: poll, and keep trying to listen.
      this.o.onError(new Error(`LISTEN ${LIVE_NOTIFY_CHANNEL} failed (${(e as Error).message}); polling until it works`));
      this.relisten(pool, 1);
    });
    return async () => {
      clearTimeout(this.relistenTimer);
      const conn = this.listenConn;
      this.listenConn = undefined;
      if (!conn) return;
      await conn.query(`UNLISTEN ${LIVE_NOTIFY_CHANNEL}`).catch(() => undefined);
      if (this.releasedConns.has(conn)) return; // lost while unlistening: its error handler released it
      this.releasedConns.add(conn);
      // Back to the pool, which watches idle connections itself: our handlers must not release it twice.
      conn.removeAllListeners('error');
      conn.removeAllListeners('notification');
      conn.release();
    };
  }

  /**
   * The listening connection is checked out of the pool for good, so the pool no longer handles
   * its errors: without a handler of our own, a PostgreSQL restart or a killed backend would be
   * an uncaught 'error' event and take the whole server down. On error the connection is
   * discarded and a new one listens after a pause (the poll covers the meantime; one extra
   * poll after re-listening picks up what changed while deaf).
   */
  private async listenOnPostgres(pool: PgListenPool): Promise<void> {
    const conn = await pool.connect();
    conn.on('error', (e: Error) => {
      if (this.releasedConns.has(conn)) return;
      this.releasedConns.add(conn);
      if (this.listenConn === conn) this.listenConn = undefined;
      conn.release(e); // an error argument makes the pool destroy the connection
      if (this.stopped) return;
      this.o.onError(new Error(`the LISTEN connection was lost (${e.message}); polling until it is back`));
      this.relisten(pool, 1);
    });
    conn.on('notification', () => this.wake());
    try {
      await conn.query(`LISTEN ${LIVE_NOTIFY_CHANNEL}`);
    } catch (e) {
      if (!this.releasedConns.has(conn)) {
        this.releasedConns.add(conn);
        conn.release(e as Error);
      }
      throw e;
    }
    this.listenConn = conn;
  }

  private relisten(pool: PgListenPool, attempt: number): void {
    if (this.stopped) return;
    const delay = Math.min(30_000, 500 * 2 ** (attempt - 1));
    this.relistenTimer = setTimeout(() => {
      this.listenOnPostgres(pool).then(
        () => {
          if (this.stopped) void this.unlisten?.();
          this.wake();
        },
        (e: unknown) => {
          if (attempt === 1 || attempt % 10 === 0) this.o.onError(new Error(`LISTEN ${LIVE_NOTIFY_CHANNEL} still failing (${(e as Error).message}); retrying`));
          this.relisten(pool, attempt + 1);
        },
      );
    }, delay);
  }
}

interface PgListenClient {
  on(event: 'notification', cb: () => void): void;
  on(event: 'error', cb: (e: Error) => void): void;
  query(text: string): Promise<unknown>;
  removeAllListeners(event: string): void;
  release(err?: Error): void;
}

interface PgListenPool {
  connect(): Promise<PgListenClient>;
}
