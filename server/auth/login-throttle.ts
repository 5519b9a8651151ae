/**
 * Counts failed sign-ins per client address and per account and locks either out for a while
 * once it has too many. Failures only: a person who signs in correctly is never slowed down.
 * Written here rather than taken from express-rate-limit because we need the per-account
 * lockout keyed on the parsed e-mail and a reset on success, which that package's per-request
 * counting does not give. In memory, per process: each node of a multi-node deployment keeps
 * its own counts (an attacker spreading over N nodes gets N times the budget).
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

interface Counter {
  failures: number;
  windowStart: number;
  lockedUntil: number;
}

const MAX_TRACKED = 50_000;

export class LoginThrottle {
  private readonly accounts = new Map<string, Counter>();
  private readonly addresses = new Map<string, Counter>();

  constructor(
    private readonly rules: ThrottleRules = DEFAULT_THROTTLE,
    private readonly now: () => number = Date.now,
  ) {}

  /** Seconds until the caller may try again, or 0 when it may try now. */
  retryAfterS(address: string, account: string): number {
    const t = this.now();
    const until = Math.max(this.accounts.get(account)?.lockedUntil ?? 0, this.addresses.get(address)?.lockedUntil ?? 0);
    return until > t ? Math.ceil((until - t) / 1000) : 0;
  }

  recordFailure(address: string, account: string): void {
    this.bump(this.accounts, account, this.rules.perAccount);
    this.bump(this.addresses, address, this.rules.perAddress);
  }

  /** A correct password clears that account's count (the address count stays: it may be guessing many accounts). */
  recordSuccess(account: string): void {
    this.accounts.delete(account);
  }

  private bump(map: Map<string, Counter>, key: string, rule: ThrottleRule): void {
    const t = this.now();
    let c = map.get(key);
    if (!c || t - c.windowStart > rule.windowMs) {
      if (map.size >= MAX_TRACKED) this.forgetStale(map, rule, t);
      c = { failures: 0, windowStart: t, lockedUntil: 0 };
      map.set(key, c);
    }
    c.failures += 1;
    if (c.failures >= rule.maxFailures) {
      c.lockedUntil = t + rule.lockoutMs;
      c.failures = 0;
      c.windowStart = t;
    }
  }

  private forgetStale(map: Map<string, Counter>, rule: ThrottleRule, t: number): void {
    for (const [k, c] of map) if (c.lockedUntil < t && t - c.windowStart > rule.windowMs) map.delete(k);
    if (map.size >= MAX_TRACKED) map.clear(); // under a flood, forgetting beats running out of memory
  }
}
