/**
 * Sign-in throttling kept in the database: per-account lockout after 5 failures in 15 minutes,
 * per-address lockout after 30, a new window once the old one is over, a success clearing the
 * account's count, and two servers on one database sharing the counts. The limits are the
 * product's own (DEFAULT_THROTTLE); locking an account after a handful of failures for a quarter
 * of an hour is common practice (OWASP Authentication Cheat Sheet, "Account lockout").
 */
import { expect } from 'chai';
import { DEFAULT_THROTTLE, LoginThrottle } from '../../server/auth/login-throttle.js';
import { dbModes, openTestDatabase, type TestDatabase } from './helpers/queue-databases.js';

for (const mode of dbModes()) {
  describe(`sign-in throttle in the database (${mode})`, function () {
    this.timeout(60_000);
    let h: TestDatabase;
    let clock = Date.parse('2026-12-02T10:00:00Z');
    const now = () => clock;
    const minutes = (m: number) => (clock += m * 60_000);

    before(async () => {
      h = await openTestDatabase(mode);
    });
    after(async () => h?.close());

    it('locks an account for 15 minutes after 5 failures in its window, and a success clears the count', async () => {
      const t = new LoginThrottle(h.db, DEFAULT_THROTTLE, now);
      for (let i = 0; i < 4; i++) await t.recordFailure('10.0.0.1', 'a@x');
      expect(await t.retryAfterS('10.0.0.1', 'a@x')).to.equal(0);
      await t.recordSuccess('a@x');
      for (let i = 0; i < 4; i++) await t.recordFailure('10.0.0.1', 'a@x');
      expect(await t.retryAfterS('10.0.0.1', 'a@x'), 'the success started the count again').to.equal(0);
      await t.recordFailure('10.0.0.1', 'a@x');
      expect(await t.retryAfterS('10.0.0.9', 'a@x')).to.equal(15 * 60);
      minutes(10);
      expect(await t.retryAfterS('10.0.0.9', 'a@x')).to.equal(5 * 60);
      minutes(5);
      expect(await t.retryAfterS('10.0.0.9', 'a@x')).to.equal(0);
    });

    it('starts a new window once the old one is over', async () => {
      const t = new LoginThrottle(h.db, DEFAULT_THROTTLE, now);
      for (let i = 0; i < 4; i++) await t.recordFailure('10.0.0.2', 'b@x');
      minutes(16);
      for (let i = 0; i < 4; i++) await t.recordFailure('10.0.0.2', 'b@x');
      expect(await t.retryAfterS('10.0.0.2', 'b@x')).to.equal(0);
    });

    it('locks an address guessing many accounts, and two servers on one database share the counts', async () => {
      const serverA = new LoginThrottle(h.db, DEFAULT_THROTTLE, now);
      const serverB = new LoginThrottle(h.db, DEFAULT_THROTTLE, now);
      for (let i = 0; i < 30; i++) await (i % 2 ? serverA : serverB).recordFailure('10.0.0.3', `guess${i}@x`);
      expect(await serverA.retryAfterS('10.0.0.3', 'someone-new@x')).to.equal(15 * 60);
      expect(await serverB.retryAfterS('10.0.0.3', 'someone-new@x')).to.equal(15 * 60);
      expect(await serverB.retryAfterS('10.0.0.4', 'guess1@x'), 'one failure does not lock an account').to.equal(0);
    });
  });
}
