import session from 'express-session';
import { eq, lt } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { sessions } from '../db/schema/index.js';

type Callback = (err?: unknown) => void;

/**
 * express-session store on our own `sessions` table (PGlite or PostgreSQL through Drizzle),
 * so sign-ins survive restarts and every node of a PostgreSQL deployment sees them. Small
 * enough to own: the published stores each target one driver, and we switch drivers.
 */
/**
 * With rolling sessions express-session touches the session on every request; one UPDATE per
 * API call competes with the queue for PGlite's single connection, so a session's expiry is
 * pushed forward at most once a minute (a minute's less idle time is harmless).
 */
const TOUCH_EVERY_MS = 60_000;
const MAX_TOUCH_MEMORY = 10_000;

export class DrizzleSessionStore extends session.Store {
  private pruneTimer?: NodeJS.Timeout;
  private readonly lastTouch = new Map<string, number>();

  constructor(
    private readonly db: AppDb,
    private readonly defaultMaxAgeMs: number,
  ) {
    super();
  }

  override get(sid: string, cb: (err: unknown, session?: session.SessionData | null) => void): void {
    this.db
      .select({ data: sessions.data, expiresAt: sessions.expiresAt })
      .from(sessions)
      .where(eq(sessions.sid, sid))
      .then(([row]) => cb(null, row && row.expiresAt.getTime() > Date.now() ? (row.data as session.SessionData) : null), cb);
  }

  override set(sid: string, sess: session.SessionData, cb?: Callback): void {
    const data = JSON.parse(JSON.stringify(sess)) as session.SessionData;
    const expiresAt = this.expiry(sess);
    this.lastTouch.set(sid, Date.now());
    this.db
      .insert(sessions)
      .values({ sid, data, expiresAt })
      .onConflictDoUpdate({ target: sessions.sid, set: { data, expiresAt } })
      .then(() => cb?.(), (err: unknown) => cb?.(err));
  }

  override destroy(sid: string, cb?: Callback): void {
    this.lastTouch.delete(sid);
    this.db.delete(sessions).where(eq(sessions.sid, sid)).then(() => cb?.(), (err: unknown) => cb?.(err));
  }

  override touch(sid: string, sess: session.SessionData, cb?: Callback): void {
    const now = Date.now();
    if (now - (this.lastTouch.get(sid) ?? 0) < TOUCH_EVERY_MS) {
      cb?.();
      return;
    }
    if (this.lastTouch.size >= MAX_TOUCH_MEMORY) this.lastTouch.clear();
    this.lastTouch.set(sid, now);
    this.db
      .update(sessions)
      .set({ expiresAt: this.expiry(sess) })
      .where(eq(sessions.sid, sid))
      .then(() => cb?.(), (err: unknown) => cb?.(err));
  }

  /** Deletes expired rows now and then every `everyMs`; the timer never keeps the process alive. */
  startPruning(everyMs: number, onError: (err: unknown) => void): void {
    const prune = () => this.pruneExpired().catch(onError);
    void prune();
    this.pruneTimer = setInterval(prune, everyMs);
    this.pruneTimer.unref();
  }

  stopPruning(): void {
    if (this.pruneTimer) clearInterval(this.pruneTimer);
  }

  async pruneExpired(): Promise<void> {
    await this.db.delete(sessions).where(lt(sessions.expiresAt, new Date()));
  }

  private expiry(sess: session.SessionData): Date {
    const expires = sess.cookie?.expires;
    return expires ? new Date(expires) : new Date(Date.now() + this.defaultMaxAgeMs);
  }
}
