/**
 * Mail over a real SMTP connection: a real server with its built-in receiver, real jobs run
 * by the real node and compute children, and the messages read back from the database the
 * receiver writes. A relay that refuses connections shows retries, a logged failure, and a
 * job that is not failed by it.
 */
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { expect } from 'chai';
import { asc, eq } from 'drizzle-orm';
import { mailMessages, mailSends, userPreferences, users } from '../../server/db/schema/index.js';
import { digestNow } from '../../server/mail/daily-digest.js';
import type { JobQueue } from '../../server/nodes/job-queue.js';
import type { Actor } from '../../server/queue/actor.js';
import { getJob } from '../../server/queue/get-job.js';
import { RESULTS_CAUTION } from '../../shared/params/result-caution.js';
import { insertReadyRecording, SCENE_ARRAY, sceneParams, writeSceneWav } from './helpers/queue-scene.js';
import { demoAccount, startTestServer, type TestServer } from './helpers/test-server.js';

async function waitFor<T>(what: string, fn: () => Promise<T | undefined>, ms = 90_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

describe('mail: job outcomes and digest through the built-in SMTP receiver', function () {
  this.timeout(240_000);
  let server: TestServer;
  let queue: JobQueue;
  let analystId: number;
  let actor: Actor;
  let recordingId: number;

  before(async () => {
    server = await startTestServer();
    queue = server.ctx.services.queue!;
    const [a] = await server.ctx.db.select().from(users).where(eq(users.email, demoAccount('analyst').email));
    analystId = a.id;
    actor = { kind: 'user', userId: a.id, role: 'analyst', email: a.email };
    recordingId = await insertReadyRecording({ db: server.ctx.db, kind: 'pglite', close: async () => undefined }, await writeSceneWav(server.dataDir, 2), a.id);
  });
  after(() => server?.close());

  const messagesTo = async (email: string) =>
    (await server.ctx.db.select().from(mailMessages).orderBy(asc(mailMessages.id))).filter((m) => m.envelopeTo.includes(email));

  it('listens on loopback only and speaks SMTP', async () => {
    const port = server.ctx.services.mail!.receiver!.port;
    expect(port).to.be.greaterThan(0);
    const banner = await new Promise<string>((resolve, reject) => {
      const s = net.connect(port, '127.0.0.1');
      s.once('data', (d) => {
        resolve(d.toString());
        s.end('QUIT\r\n');
      });
      s.once('error', reject);
    });
    expect(banner).to.match(/^220 /); // RFC 5321 §4.2: the greeting is a 220 reply
  });

  it('mails the owner when a job succeeds, with the analysis caution', async () => {
    const job = await queue.submit(
      { name: 'Mail check success', ownerId: analystId, params: sceneParams(8), paramsVersion: 1, recordingId, arraySnapshot: SCENE_ARRAY },
      actor,
    );
    const [msg] = await waitFor('success mail', async () => {
      const m = (await messagesTo(demoAccount('analyst').email)).filter((x) => x.subject.includes(`Job ${job.id} `));
      return m.length ? m : undefined;
    });
    expect((await getJob(server.ctx.db, job.id)).state).to.equal('succeeded');
    expect(msg.subject).to.equal(`[Nullsmith] Job ${job.id} "Mail check success" succeeded`);
    expect(msg.textBody).to.include(RESULTS_CAUTION.slice(0, 60));
    expect(msg.textBody).to.include(`/jobs/${job.id}`);
    expect(msg.raw).to.match(/^Received: |^Content-Type|^From: /m); // the raw RFC 5322 message is kept
    const [send] = await server.ctx.db.select().from(mailSends).where(eq(mailSends.subjectRef, `job:${job.id}`));
    expect(send.state).to.equal('sent');
    expect(send.relay).to.equal('local receiver');
  });

  it('mails owner and operations when a job fails, with the reason', async () => {
    // A recording whose file vanished from disk after it was registered: a permanent failure.
    const vanishing = path.join(server.dataDir, 'vanished.wav');
    fs.copyFileSync(await writeSceneWav(server.dataDir, 2), vanishing);
    const goneId = await insertReadyRecording({ db: server.ctx.db, kind: 'pglite', close: async () => undefined }, vanishing, analystId);
    fs.rmSync(vanishing);
    const job = await queue.submit(
      { name: 'Mail check failure', ownerId: analystId, params: sceneParams(8), paramsVersion: 1, recordingId: goneId, arraySnapshot: SCENE_ARRAY, maxAttempts: 1 },
      actor,
    );
    const [msg] = await waitFor('failure mail', async () => {
      const m = (await server.ctx.db.select().from(mailMessages)).filter((x) => x.subject.includes(`Job ${job.id} `));
      return m.length ? m : undefined;
    });
    expect(msg.subject).to.match(/failed$/);
    expect(msg.envelopeTo).to.include.members([demoAccount('analyst').email, demoAccount('operations').email]);
    expect(msg.textBody).to.match(/vanished\.wav is missing or unreadable/);
  });

  it('mails the owner when a job is cancelled, once', async () => {
    await queue.setPaused(true, { kind: 'node', nodeId: 'test' });
    const job = await queue.submit({ name: 'Mail check cancel', ownerId: analystId, params: sceneParams(8), paramsVersion: 1, recordingId, arraySnapshot: SCENE_ARRAY }, actor);
    await queue.cancel(job.id, actor);
    await queue.setPaused(false, { kind: 'node', nodeId: 'test' });
    const msgs = await waitFor('cancel mail', async () => {
      const m = (await messagesTo(demoAccount('analyst').email)).filter((x) => x.subject.includes(`Job ${job.id} `));
      return m.length ? m : undefined;
    });
    // a repeated state event must not send a second message
    queue.emitState(await getJob(server.ctx.db, job.id), 'queued');
    await server.ctx.services.mail!.mailer.idle();
    await new Promise((r) => setTimeout(r, 300));
    expect(msgs[0].subject).to.match(/cancelled$/);
    expect((await messagesTo(demoAccount('analyst').email)).filter((x) => x.subject.includes(`Job ${job.id} `))).to.have.length(1);
  });

  it('sends the digest only to people who asked for it', async () => {
    await server.ctx.db.insert(userPreferences).values({ userId: analystId, dailyDigest: true });
    const ctx = server.ctx;
    const result = await digestNow(ctx.db, ctx.services.mail!.mailer, ctx.services.mail!.config);
    await ctx.services.mail!.mailer.idle();
    expect(result.recipients).to.equal(1);
    const digests = (await ctx.db.select().from(mailMessages)).filter((m) => m.subject.includes('Overnight digest'));
    expect(digests).to.have.length(1);
    expect(digests[0].envelopeTo).to.deep.equal([demoAccount('analyst').email]);
    expect(digests[0].textBody).to.include('Mail check success').and.include('Mail check cancel');
  });
});

describe('mail: a relay that does not answer', function () {
  this.timeout(120_000);
  let server: TestServer;
  let closedPort: number;

  before(async () => {
    // a port that was just free: connections are refused
    const probe = net.createServer();
    await new Promise<void>((r) => probe.listen(0, '127.0.0.1', () => r()));
    closedPort = (probe.address() as net.AddressInfo).port;
    await new Promise<void>((r) => probe.close(() => r()));
    // mail settings are read from the process environment at start-up
    Object.assign(process.env, relayEnv(closedPort));
    try {
      server = await startTestServer();
    } finally {
      for (const k of Object.keys(relayEnv(0))) delete process.env[k];
    }
  });
  after(() => server?.close());
  const relayEnv = (port: number) => ({ SMTP_HOST: '127.0.0.1', SMTP_PORT: String(port), MAIL_ATTEMPTS: '3', MAIL_RETRY_MS: '20' });

  it('retries, logs the failure, and never throws', async () => {
    const mail = server.ctx.services.mail!;
    expect(mail.receiver).to.equal(undefined);
    const outcome = await mail.mailer.send({ kind: 'job-outcome', to: ['someone@example.org'], subject: 'unreachable relay', text: 'x' });
    expect(outcome?.state).to.equal('failed');
    expect(outcome?.attempts).to.equal(3);
    const [row] = await server.ctx.db.select().from(mailSends).where(eq(mailSends.subject, 'unreachable relay'));
    expect(row.state).to.equal('failed');
    expect(row.lastError).to.match(/ECONNREFUSED/);
    expect(row.relay).to.equal(`127.0.0.1:${closedPort}`);
  });
});
