/**
 * The compute pool with real forked compute children (worker/compute-main.ts): results,
 * progress, cancel between units of work, a SIGKILLed child, the concurrency bound.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { ComputeChildExitedError, ComputeTaskError } from '../../server/nodes/compute-errors.js';
import { ForkedComputePool } from '../../server/nodes/compute-pool.js';
import type { FileDigestResult } from '../../worker/tasks/file-digest.js';

describe('compute pool: forked compute children', function () {
  this.timeout(60_000);
  let dir: string;
  let pool: ForkedComputePool;
  let big: string;

  before(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-pool-'));
    big = path.join(dir, 'big.bin');
    // sparse 768 MiB file: reading and hashing it takes a few seconds, writing it takes nothing
    fs.closeSync(fs.openSync(big, 'w'));
    fs.truncateSync(big, 768 * 1024 * 1024);
    pool = new ForkedComputePool({ concurrency: 2, idleMs: 5_000, cancelGraceMs: 5_000 });
  });
  after(async () => {
    await pool?.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('hashes in a child: SHA-256("abc") matches the FIPS 180-2 example (Appendix B.1)', async () => {
    const f = path.join(dir, 'abc.txt');
    fs.writeFileSync(f, 'abc');
    const r = await pool.run<FileDigestResult>('file-digest', { path: f });
    // NIST FIPS 180-2 (2002), Appendix B.1, one-block message "abc"
    expect(r).to.deep.equal({ algorithm: 'sha256', hex: 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad', bytes: 3 });
  });

  it('reports monotonic progress up to the total, and matches node:crypto on a larger file', async () => {
    const f = path.join(dir, 'mid.bin');
    const data = crypto.randomBytes(9 * 1024 * 1024 + 17);
    fs.writeFileSync(f, data);
    const seen: number[] = [];
    const r = await pool.run<FileDigestResult>('file-digest', { path: f }, { onProgress: (p) => seen.push(p.done) });
    expect(r.hex).to.equal(crypto.createHash('sha256').update(data).digest('hex'));
    expect(seen[0]).to.equal(0);
    expect(seen.at(-1)).to.equal(data.length);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).to.be.greaterThan(seen[i - 1]);
  });

  it('stops a task between units of work when its signal aborts, and the child stays usable', async () => {
    const ac = new AbortController();
    let firstProgressAt = 0;
    const t0 = Date.now();
    const run = pool.run('file-digest', { path: big }, {
      signal: ac.signal,
      onProgress: (p) => {
        if (p.done > 0 && !firstProgressAt) {
          firstProgressAt = Date.now();
          ac.abort();
        }
      },
    });
    const err = await run.catch((e: unknown) => e);
    const latency = Date.now() - firstProgressAt;
    expect(err).to.be.instanceOf(ComputeTaskError);
    expect(err).to.include({ aborted: true, permanent: false });
    expect(latency).to.be.lessThan(2_000); // one 4 MiB chunk, not the remaining ~760 MiB
    expect(Date.now() - t0).to.be.lessThan(20_000);
    const after = await pool.run<FileDigestResult>('file-digest', { path: path.join(dir, 'abc.txt') });
    expect(after.bytes).to.equal(3);
  });

  it('a SIGKILLed child rejects its task with a clear transient error; the pool carries on', async () => {
    let killed = false;
    const err = await pool
      .run('file-digest', { path: big }, {
        onProgress: (p) => {
          if (p.done > 0 && !killed) {
            killed = true;
            for (const pid of pool.busyPids()) process.kill(pid, 'SIGKILL');
          }
        },
      })
      .catch((e: unknown) => e);
    expect(err).to.be.instanceOf(ComputeChildExitedError);
    expect((err as Error).message).to.match(/exited on signal SIGKILL .* will be retried from the last checkpoint/);
    expect((err as ComputeChildExitedError).permanent).to.equal(false);
    const again = await pool.run<FileDigestResult>('file-digest', { path: path.join(dir, 'abc.txt') });
    expect(again.bytes).to.equal(3);
  });

  it('runs at most `concurrency` tasks at once and queues the rest', async () => {
    const f = path.join(dir, 'mid.bin');
    const runs = [1, 2, 3, 4].map(() => pool.run<FileDigestResult>('file-digest', { path: f }));
    const s = pool.status();
    expect(s.running).to.be.at.most(2);
    expect(s.running + s.waiting).to.equal(4);
    const results = await Promise.all(runs);
    expect(new Set(results.map((r) => r.hex)).size).to.equal(1);
    expect(pool.status().children.length).to.be.at.most(2);
  });

  it('refuses unknown task kinds and bad payloads with clear, permanent errors', async () => {
    const e1 = await pool.run('no-such-task', {}).catch((e: unknown) => e);
    expect((e1 as Error).message).to.match(/No compute task "no-such-task"; known tasks: .*file-digest/);
    const e2 = await pool.run('file-digest', { path: path.join(dir, 'missing.wav') }).catch((e: unknown) => e);
    expect(e2).to.include({ permanent: true });
    expect((e2 as Error).message).to.match(/Cannot open .*missing\.wav to hash it \(ENOENT\)/);
  });
});
