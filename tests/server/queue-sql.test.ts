/**
 * The queue's SQL layer on PGlite and (when TEST_DATABASE_URL is set) PostgreSQL: state
 * machine, ordering, reprioritising, cancel, pause, start-after, retry back-off, leases.
 * Time is simulated by moving timestamps back (ageJob), never by sleeping.
 */
import { expect } from 'chai';
import { eq, sql } from 'drizzle-orm';
import { jobs } from '../../server/db/schema/jobs.js';
import { audit } from '../../server/db/schema/audit.js';
import { jobEvents } from '../../server/db/schema/job-events.js';
import type { Actor } from '../../server/queue/actor.js';
import { acknowledgeCancel } from '../../server/queue/acknowledge-cancel.js';
import { backoffCeilingMs, backoffRangeMs } from '../../server/queue/backoff.js';
import { cancelJob } from '../../server/queue/cancel-job.js';
import { claimJob } from '../../server/queue/claim-job.js';
import { completeJob } from '../../server/queue/complete-job.js';
import { setNodeDraining } from '../../server/queue/drain-node.js';
import { enqueueJob } from '../../server/queue/enqueue-job.js';
import { failJob } from '../../server/queue/fail-job.js';
import { getJob } from '../../server/queue/get-job.js';
import { setQueuePaused } from '../../server/queue/pause-queue.js';
import { reapExpired } from '../../server/queue/reap-expired.js';
import { registerNode } from '../../server/queue/register-node.js';
import { releaseJob } from '../../server/queue/release-job.js';
import { renewLease } from '../../server/queue/renew-lease.js';
import { setPriority } from '../../server/queue/set-priority.js';
import { assertTransition, canMove, IllegalTransitionError, TRANSITIONS } from '../../server/queue/transitions.js';
import { JOB_STATES } from '../../shared/api/jobs.js';
import { ageJob, dbModes, insertTestUser, openTestDatabase, type TestDatabase } from './helpers/queue-databases.js';

const LEASE = 30_000;
const POLICY = { baseMs: 1000, capMs: 8000 };

describe('queue state machine (one table of legal moves)', () => {
  it('refuses every move out of a final state and allows only listed moves', () => {
    for (const from of JOB_STATES) {
      for (const to of JOB_STATES) {
        const legal = TRANSITIONS[from].includes(to);
        expect(canMove(from, to)).to.equal(legal);
        if (legal) assertTransition(from, to);
        else expect(() => assertTransition(from, to)).to.throw(IllegalTransitionError, `A ${from} job cannot become ${to}.`);
      }
    }
    for (const final of ['succeeded', 'failed', 'cancelled'] as const) expect(TRANSITIONS[final]).to.deep.equal([]);
  });

  it('backoff doubles per attempt, never exceeds the cap, and keeps at least half the delay (equal jitter)', () => {
    // Equal jitter: delay in [d/2, d], d = min(cap, base*2^(n-1)) -- Brooker, "Exponential Backoff
    // And Jitter", AWS Architecture Blog, 2015 ("Equal Jitter"), quoted from memory.
    expect([1, 2, 3, 4, 5, 20].map((n) => backoffCeilingMs(n, POLICY))).to.deep.equal([1000, 2000, 4000, 8000, 8000, 8000]);
    expect(backoffRangeMs(3, POLICY)).to.deep.equal([2000, 4000]);
    expect(backoffCeilingMs(500, { baseMs: 10_000, capMs: 600_000 })).to.equal(600_000);
  });
});

for (const mode of dbModes()) {
  describe(`queue SQL operations (${mode})`, function () {
    this.timeout(60_000);
    let h: TestDatabase;
    let owner: number;
    let ops: Actor;
    const analyst = (): Actor => ({ kind: 'user', userId: owner, role: 'analyst', email: 'a@test' });

    before(async () => {
      h = await openTestDatabase(mode);
      owner = await insertTestUser(h, 'analyst');
      ops = { kind: 'user', userId: await insertTestUser(h, 'operations'), role: 'operations', email: 'ops@test' };
      await registerNode(h.db, { id: 'node-a', host: 'test', pid: 1, kind: 'server', concurrency: 1 });
      await registerNode(h.db, { id: 'node-b', host: 'test', pid: 2, kind: 'headless', concurrency: 1 });
    });
    after(async () => h?.close());
    beforeEach(async () => {
      // every test starts from an empty, running queue
      await h.db.execute(sql`delete from jobs`);
      await h.db.execute(sql`delete from queue_state`);
      await h.db.execute(sql`update nodes set draining = false`);
    });

    const submit = (name: string, extra: { priority?: number; runAfter?: Date; maxAttempts?: number } = {}) =>
      enqueueJob(h.db, { name, ownerId: owner, params: { test: name }, paramsVersion: 1, ...extra }, analyst());

    it('claims by priority (higher first), then first come first served', async () => {
      const a = await submit('a');
      const b = await submit('b', { priority: 5 });
      const c = await submit('c');
      const d = await submit('d', { priority: 5 });
      const order: number[] = [];
      for (let i = 0; i < 4; i++) order.push((await claimJob(h.db, 'node-a', LEASE))!.id);
      expect(order).to.deep.equal([b.id, d.id, a.id, c.id]);
      expect(await claimJob(h.db, 'node-a', LEASE)).to.equal(undefined);
    });

    it('counts the attempt and takes a lease at claim; writes to a running job need the lease', async () => {
      const j = await submit('lease');
      const claimed = (await claimJob(h.db, 'node-a', LEASE))!;
      expect(claimed.state).to.equal('running');
      expect(claimed.attempts).to.equal(1);
      expect(claimed.claimedBy).to.equal('node-a');
      expect(claimed.leaseExpiresAt!.getTime()).to.be.greaterThan(Date.now() + LEASE - 10_000);
      // another node cannot renew, complete, fail or release it
      expect(await renewLease(h.db, j.id, 'node-b', LEASE)).to.equal(undefined);
      expect(await completeJob(h.db, j.id, 'node-b', 10)).to.equal(undefined);
      expect(await failJob(h.db, j.id, 'node-b', { message: 'x', permanent: true }, POLICY)).to.equal(undefined);
      expect(await releaseJob(h.db, j.id, 'node-b', 'x')).to.equal(undefined);
      expect((await getJob(h.db, j.id)).state).to.equal('running');
      // the holder can
      expect(await renewLease(h.db, j.id, 'node-a', LEASE, { windowsDone: 4, totalWindows: 10, checkpointWindow: 4 })).to.deep.equal({
        cancelRequested: false,
      });
      // a checkpoint never moves backwards
      await renewLease(h.db, j.id, 'node-a', LEASE, { checkpointWindow: 2 });
      expect((await getJob(h.db, j.id)).checkpointWindow).to.equal(4);
      const done = (await completeJob(h.db, j.id, 'node-a', 10))!;
      expect(done.state).to.equal('succeeded');
      expect(done.claimedBy).to.equal(null);
      expect(done.finishedAt).to.be.instanceOf(Date);
      // and a finished job cannot be completed twice
      expect(await completeJob(h.db, j.id, 'node-a', 10)).to.equal(undefined);
      const history = await h.db.select().from(jobEvents).where(eq(jobEvents.jobId, j.id)).orderBy(jobEvents.id);
      expect(history.map((e) => e.toState)).to.deep.equal(['queued', 'running', 'succeeded']);
    });

    it('reprioritises waiting jobs, refuses running ones with 409, and audits the change', async () => {
      const a = await submit('a');
      const b = await submit('b');
      await setPriority(h.db, b.id, 10, ops);
      expect((await claimJob(h.db, 'node-a', LEASE))!.id).to.equal(b.id);
      let err: unknown;
      try {
        await setPriority(h.db, b.id, 50, ops);
      } catch (e) {
        err = e;
      }
      expect(err).to.include({ status: 409, code: 'job_not_waiting' });
      expect((err as Error).message).to.match(/is running: changing the priority is only possible while a job is queued or scheduled/);
      const [entry] = await h.db.select().from(audit).where(eq(audit.target, `job:${b.id}`));
      expect(entry).to.include({ action: 'job.priority', userId: ops.kind === 'user' ? ops.userId : -1 });
      expect(entry.before).to.deep.equal({ priority: 0 });
      expect(entry.after).to.deep.equal({ priority: 10 });
      expect((await getJob(h.db, a.id)).state).to.equal('queued');
    });

    it('cancels a queued job at once and a running one through the flag, keeping finished windows (partial)', async () => {
      const q = await submit('queued');
      const r = await submit('running', { priority: 1 });
      await claimJob(h.db, 'node-a', LEASE);
      const c1 = await cancelJob(h.db, q.id, analyst());
      expect(c1.immediate).to.equal(true);
      expect(c1.job.state).to.equal('cancelled');
      const c2 = await cancelJob(h.db, r.id, analyst());
      expect(c2.immediate).to.equal(false);
      expect(c2.job.state).to.equal('running');
      // the node learns it at its next renewal
      expect(await renewLease(h.db, r.id, 'node-a', LEASE, { checkpointWindow: 3 })).to.deep.equal({ cancelRequested: true });
      const ack = (await acknowledgeCancel(h.db, r.id, 'node-a', 3))!;
      expect(ack).to.include({ state: 'cancelled', partial: true, checkpointWindow: 3 });
      // cancelling a finished job is refused clearly
      const err = await cancelJob(h.db, r.id, analyst()).catch((e: unknown) => e);
      expect(err).to.include({ status: 409, code: 'job_finished' });
      expect((await claimJob(h.db, 'node-a', LEASE))).to.equal(undefined);
    });

    it('pause stops claiming on every node; resume restarts it; both audited', async () => {
      const j = await submit('p');
      await setQueuePaused(h.db, true, ops);
      expect(await claimJob(h.db, 'node-a', LEASE)).to.equal(undefined);
      expect(await claimJob(h.db, 'node-b', LEASE)).to.equal(undefined);
      await setQueuePaused(h.db, false, ops);
      expect((await claimJob(h.db, 'node-b', LEASE))!.id).to.equal(j.id);
      const actions = (await h.db.select().from(audit).where(eq(audit.target, 'queue')).orderBy(audit.id)).map((a) => a.action);
      expect(actions.slice(-2)).to.deep.equal(['queue.pause', 'queue.resume']);
    });

    it('a draining node claims nothing; others still do', async () => {
      const j = await submit('d');
      await setNodeDraining(h.db, 'node-a', true, ops);
      expect(await claimJob(h.db, 'node-a', LEASE)).to.equal(undefined);
      expect((await claimJob(h.db, 'node-b', LEASE))!.id).to.equal(j.id);
    });

    it('a job with a future start-after waits as scheduled and is claimed once due', async () => {
      const j = await submit('overnight', { runAfter: new Date(Date.now() + 3_600_000), priority: 99 });
      expect(j.state).to.equal('scheduled');
      const now = await submit('now');
      expect((await claimJob(h.db, 'node-a', LEASE))!.id).to.equal(now.id);
      expect(await claimJob(h.db, 'node-a', LEASE)).to.equal(undefined);
      await ageJob(h, j.id, 'run_after', 3_600_000 + 1000);
      expect((await claimJob(h.db, 'node-a', LEASE))!.id).to.equal(j.id);
    });

    it('retries transient failures after a capped, jittered back-off; fails permanent ones at once', async () => {
      const j = await submit('flaky', { maxAttempts: 6 });
      const delays: number[] = [];
      for (let attempt = 1; attempt <= 5; attempt++) {
        const c = (await claimJob(h.db, 'node-a', LEASE))!;
        expect(c.attempts).to.equal(attempt);
        const t0 = Date.now();
        const f = (await failJob(h.db, j.id, 'node-a', { message: `disk hiccup ${attempt}`, permanent: false }, POLICY))!;
        expect(f.state).to.equal('scheduled');
        expect(f.lastError).to.equal(`disk hiccup ${attempt}`);
        const delay = f.runAfter.getTime() - t0;
        const [lo, hi] = backoffRangeMs(attempt, POLICY);
        expect(delay).to.be.within(lo - 1500, hi + 1500); // allowance for clock skew between test and database
        delays.push(delay);
        expect(await claimJob(h.db, 'node-a', LEASE)).to.equal(undefined); // not yet due
        await ageJob(h, j.id, 'run_after', hi + 1000);
      }
      expect(Math.max(...delays)).to.be.at.most(POLICY.capMs + 1500);
      // the last attempt is used up: failed, with the reason kept
      await claimJob(h.db, 'node-a', LEASE);
      const last = (await failJob(h.db, j.id, 'node-a', { message: 'disk hiccup 6', permanent: false }, POLICY))!;
      expect(last).to.include({ state: 'failed', lastError: 'disk hiccup 6', attempts: 6 });

      const bad = await submit('bad file');
      await claimJob(h.db, 'node-a', LEASE);
      const p = (await failJob(h.db, bad.id, 'node-a', { message: 'Recording 7 is not a WAV file.', permanent: true }, POLICY))!;
      expect(p).to.include({ state: 'failed', attempts: 1, lastError: 'Recording 7 is not a WAV file.' });
    });

    it('reaps expired leases through the retry path, fails when attempts are used up, honours a pending cancel', async () => {
      const a = await submit('lost', { maxAttempts: 2, priority: 3 });
      const b = await submit('lost-last', { maxAttempts: 1, priority: 2 });
      const c = await submit('lost-cancel', { priority: 1 });
      for (let i = 0; i < 3; i++) await claimJob(h.db, 'node-a', LEASE);
      await renewLease(h.db, c.id, 'node-a', LEASE, { checkpointWindow: 2 });
      await cancelJob(h.db, c.id, analyst());
      expect(await reapExpired(h.db, 'node-b', POLICY)).to.deep.equal([]); // leases still valid
      for (const j of [a, b, c]) await ageJob(h, j.id, 'lease_expires_at', LEASE + 1000);
      const reaped = await reapExpired(h.db, 'node-b', POLICY);
      expect(reaped.map((r) => [r.id, r.state, r.lostNode]).sort((x, y) => Number(x[0]) - Number(y[0]))).to.deep.equal([
        [a.id, 'scheduled', 'node-a'],
        [b.id, 'failed', 'node-a'],
        [c.id, 'cancelled', 'node-a'],
      ]);
      const ra = await getJob(h.db, a.id);
      expect(ra.lastError).to.match(/^Node node-a stopped renewing its lease .* during attempt 1 of 2\.$/);
      expect(ra.claimedBy).to.equal(null);
      expect((await getJob(h.db, c.id)).partial).to.equal(true);
      // the node that lost the lease can no longer write
      expect(await renewLease(h.db, a.id, 'node-a', LEASE)).to.equal(undefined);
      expect(await completeJob(h.db, a.id, 'node-a', 5)).to.equal(undefined);
    });

    it('releasing at shutdown refunds the attempt and keeps the checkpoint', async () => {
      const j = await submit('release');
      await claimJob(h.db, 'node-a', LEASE);
      await renewLease(h.db, j.id, 'node-a', LEASE, { checkpointWindow: 7 });
      const r = (await releaseJob(h.db, j.id, 'node-a', 'node stopping'))!;
      expect(r).to.include({ state: 'queued', attempts: 0, checkpointWindow: 7 });
    });

    it('concurrent claims from two nodes never take the same job', async () => {
      for (let i = 0; i < 20; i++) await submit(`c${i}`);
      const claims = await Promise.all(
        Array.from({ length: 24 }, (_, i) => claimJob(h.db, i % 2 ? 'node-a' : 'node-b', LEASE)),
      );
      const ids = claims.filter((c) => c !== undefined).map((c) => c.id);
      expect(ids).to.have.length(20);
      expect(new Set(ids).size).to.equal(20);
      const res = (await h.db.execute(sql`select count(*)::int as n from jobs where state = 'running'`)) as unknown as { rows: { n: number }[] };
      const [{ n }] = res.rows;
      expect(Number(n)).to.equal(20);
    });

    it('the database refuses a running job without a lease (check constraint)', async () => {
      const j = await submit('ck');
      const err = await h.db.update(jobs).set({ state: 'running' }).where(eq(jobs.id, j.id)).catch((e: unknown) => e);
      expect(String((err as Error).message) + String((err as { cause?: Error }).cause?.message)).to.match(/jobs_running_has_lease_ck/);
    });
  });
}
