/**
 * Result retention on a real server: real jobs leave real result files; a sweep deletes the
 * files of jobs that ended before the retention period, reports and reclaims the space, audits
 * each deletion, keeps pinned jobs, and leaves the job rows and their history.
 */
import fs from 'node:fs';
import { expect } from 'chai';
import { eq, inArray } from 'drizzle-orm';
import { audit, jobs, resultPurges, users } from '../../server/db/schema/index.js';
import { jobResultsDir } from '../../server/nodes/beamform-payload.js';
import { folderBytes } from '../../server/retention/result-purge.js';
import { getJob } from '../../server/queue/get-job.js';
import { insertReadyRecording, SCENE_ARRAY, sceneParams, writeSceneWav } from './helpers/queue-scene.js';
import { demoAccount, startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';

describe('result retention', function () {
  this.timeout(300_000);
  let server: TestServer;
  let admin: TestClient;
  let ops: TestClient;
  const ids: number[] = [];

  before(async () => {
    server = await startTestServer();
    admin = await server.signIn('admin');
    ops = await server.signIn('operations');
    const [a] = await server.ctx.db.select().from(users).where(eq(users.email, demoAccount('analyst').email));
    const recordingId = await insertReadyRecording({ db: server.ctx.db, kind: 'pglite', close: async () => undefined }, await writeSceneWav(server.dataDir, 2), a.id);
    const actor = { kind: 'user' as const, userId: a.id, role: a.role, email: a.email };
    for (const name of ['Old unpinned', 'Old pinned', 'Recent']) {
      const job = await server.ctx.services.queue!.submit({ name, ownerId: a.id, params: sceneParams(8), paramsVersion: 1, recordingId, arraySnapshot: SCENE_ARRAY }, actor);
      ids.push(job.id);
    }
    const end = Date.now() + 180_000;
    while ((await server.ctx.db.select().from(jobs).where(inArray(jobs.id, ids))).some((j) => j.state !== 'succeeded')) {
      if (Date.now() > end) throw new Error('jobs did not finish');
      await new Promise((r) => setTimeout(r, 250));
    }
    // the first two ended 40 days ago
    await server.ctx.db.update(jobs).set({ finishedAt: new Date(Date.now() - 40 * 86_400_000) }).where(inArray(jobs.id, ids.slice(0, 2)));
  });
  after(() => server?.close());

  it('does nothing while retention is 0 (keep for ever)', async () => {
    const res = await admin.post('/api/retention/sweep', {});
    expect(res.status).to.equal(200);
    expect(((await res.json()) as { jobIds: number[] }).jobIds).to.deep.equal([]);
  });

  it('deletes expired results, reclaims the space and audits it; pinned jobs stay', async () => {
    const dirs = ids.map((id) => jobResultsDir(server.ctx.config.resultsDir, id));
    const sizes = await Promise.all(dirs.map(folderBytes));
    expect(sizes.every((s) => s > 0)).to.equal(true);
    expect((await ops.put(`/api/retention/pins/${ids[1]}`, { note: 'survey report figure 4' })).status).to.equal(204);
    expect((await admin.patch('/api/settings', { resultRetentionDays: 30 })).status).to.equal(200);

    const res = await admin.post('/api/retention/sweep', {});
    const report = (await res.json()) as { jobIds: number[]; bytesReclaimed: number; pinnedKept: number; freeBytesBefore: number | null; freeBytesAfter: number | null };
    expect(report.jobIds).to.deep.equal([ids[0]]);
    expect(report.bytesReclaimed).to.equal(sizes[0]);
    expect(report.pinnedKept).to.equal(1);
    if (report.freeBytesBefore !== null && report.freeBytesAfter !== null) {
      // other processes write to the same disk, so only a loose check: space did not shrink by more than others could use
      expect(report.freeBytesAfter).to.be.at.least(report.freeBytesBefore - 64 * 1024 ** 2);
    }
    expect(fs.existsSync(dirs[0])).to.equal(false);
    expect(fs.existsSync(dirs[1])).to.equal(true);
    expect(fs.existsSync(dirs[2])).to.equal(true);
    expect((await getJob(server.ctx.db, ids[0])).state).to.equal('succeeded'); // the job row stays
    const [purge] = await server.ctx.db.select().from(resultPurges).where(eq(resultPurges.jobId, ids[0]));
    expect(purge.bytesReclaimed).to.equal(sizes[0]);
    const [entry] = await server.ctx.db.select().from(audit).where(eq(audit.target, `job:${ids[0]}`)).then((r) => r.filter((e) => e.action === 'results.delete'));
    expect(entry.after).to.include({ bytesReclaimed: sizes[0], retentionDays: 30 });
    const csv = await ops.get(`/api/jobs/${ids[0]}/sinr.csv`);
    expect(csv.status).to.equal(410); // gone, and the message says the retention rule removed them
    const body = (await csv.json()) as { error: { code: string; message: string } };
    expect(body.error.code).to.equal('results_deleted');
    expect(body.error.message).to.match(/deleted by the retention rule/);
  });

  it('a second sweep finds nothing; unpinning lets the next one delete', async () => {
    const again = (await (await admin.post('/api/retention/sweep', {})).json()) as { jobIds: number[] };
    expect(again.jobIds).to.deep.equal([]);
    expect((await ops.delete(`/api/retention/pins/${ids[1]}`)).status).to.equal(204);
    const third = (await (await admin.post('/api/retention/sweep', {})).json()) as { jobIds: number[] };
    expect(third.jobIds).to.deep.equal([ids[1]]);
    const pinGone = await ops.put(`/api/retention/pins/${ids[1]}`, {});
    expect(pinGone.status).to.equal(409);
    expect((await ops.post('/api/retention/sweep', {})).status).to.equal(403); // on demand is for admins
  });
});
