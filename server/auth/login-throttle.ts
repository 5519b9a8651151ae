import { and, eq, inArray, isNull, lt, or, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { loginFailures } from '../db/schema/login-failures.js';

/**
 * Counts failed sign-ins per client address and per account and locks either out for a while
 * once it has too many. Failures only: a person who signs in correctly is never slowed down.
 * Written here rather than taken from express-rate-limit because we need the per-account
 * lockout keyed on the parsed e-mail and a reset on success, which that package's per-request
 * counting does not give. The counts live in the database (login_failures), so every server of
 * a deployment shares them and a restart does not hand an attacker a fresh budget.
 */
export interface ThrottleRule {
  maxFailures: number;
  windowMs: number;
  lockoutMs: number;
}

export interface ThrottleRules {
  perAccount: ThrottleRule;
  perAddress: ThrottleRule;
}

export const DEFAULT_THROTTLE: ThrottleRules = {
  perAccount: { maxFailures: 5, windowMs: 15 * 60_000, lockoutMs: 15 * 60_000 },
  perAddress: { maxFailures: 30, windowMs: 15 * 60_000, lockoutMs: 15 * 60_000 },
};

/** Every this many failures, rows whose window and lockout are both over are deleted. */
const PRUNE_EVERY = 200;

const accountKey = (account: string) => `account:${account}`;
const addressKey = (address: string) => `address:${address}`;
const at = (ms: number) => sql`${new Date(ms).toISOString()}::timestamptz`;

export class LoginThrottle {
  private failuresSincePrune = 0;

  constructor(
    private readonly db: AppDb,
    private readonly rules: ThrottleRules = DEFAULT_THROTTLE,
    private readonly now: () => number = Date.now,
  ) {}

  /** Seconds until the caller may try again, or 0 when it may try now. */
  async retryAfterS(address: string, account: string): Promise<number> {
    const rows = await this.db
      .select({ lockedUntil: loginFailures.lockedUntil })
      .from(loginFailures)
      .where(inArray(loginFailures.key, [accountKey(account), addressKey(address)]));
    const until = Math.max(0, ...rows.map((r) => r.lockedUntil?.getTime() ?? 0));
    const t = this.now();
    return until > t ? Math.ceil((until - t) / 1000) : 0;
  }

  async recordFailure(address: string, account: string): Promise<void> {
    await this.bump(accountKey(account), this.rules.perAccount);
    await this.bump(addressKey(address), this.rules.perAddress);
    if (++this.failuresSincePrune >= PRUNE_EVERY) {
      this.failuresSincePrune = 0;
      await this.prune();
    }
  }

  /** A correct password clears that account's count (the address count stays: it may be guessing many accounts). */
  async recordSuccess(account: string): Promise<void> {
    await this.db.delete(loginFailures).where(eq(loginFailures.key, accountKey(account)));
  }

  /** One more failure for `key`: a new window once the old one is over; at the limit, a lockout and a fresh count. */
  private async bump(key: string, rule: ThrottleRule): Promise<void> {
    const t = this.now();
    const windowOver = sql`${loginFailures.windowStart} < ${at(t - rule.windowMs)}`;
    const [row] = await this.db
      .insert(loginFailures)
      .values({ key, failures: 1, windowStart: new Date(t), lockedUntil: null })
      .onConflictDoUpdate({
        target: loginFailures.key,
        set: {
          failures: sql`case when ${windowOver} then 1 else ${loginFailures.failures} + 1 end`,
          windowStart: sql`case when ${windowOver} then ${at(t)} else ${loginFailures.windowStart} end`,
        },
      })
      .returning({ failures: loginFailures.failures });
    if (row.failures >= rule.maxFailures) {
      await this.db
        .update(loginFailures)
        .set({ failures: 0, windowStart: new Date(t), lockedUntil: new Date(t + rule.lockoutMs) })
        .where(eq(loginFailures.key, key));
    }
  }

  private async prune(): Promise<void> {
    const t = this.now();
    const longest = Math.max(this.rules.perAccount.windowMs, this.rules.perAddress.windowMs);
    await this.db
      .delete(loginFailures)
      .where(and(lt(loginFailures.windowStart, new Date(t - longest)), or(isNull(loginFailures.lockedUntil), lt(loginFailures.lockedUntil, new Date(t)))));
  }
}
