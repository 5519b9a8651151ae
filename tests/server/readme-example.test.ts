/**
 * The README's shell example, extracted from README.md and run with bash against a live
 * server: chunked upload with curl, array, job, progress, CSV download. If the README or the
 * API changes so that the example no longer works, this fails.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { and, eq } from 'drizzle-orm';
import { audit } from '../../server/db/schema/index.js';
import { REPO_ROOT } from '../../server/version.js';
import { RESULTS_CAUTION } from '../../shared/params/result-caution.js';
import { startTestServer, type TestServer } from './helpers/test-server.js';

const MARKER = '<!-- readme-example: scripted-access';

export function readmeExample(): string {
  const readme = fs.readFileSync(path.join(REPO_ROOT, 'README.md'), 'utf8');
  const at = readme.indexOf(MARKER);
  if (at < 0) throw new Error('README.md lost its scripted-access example marker');
  const block = /```sh\n([\s\S]*?)\n```/.exec(readme.slice(at));
  if (!block) throw new Error('no ```sh block after the scripted-access marker in README.md');
  return block[1];
}

function run(script: string, cwd: string, env: Record<string, string>): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn('bash', ['-c', script], { cwd, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code: code ?? -1, stdout, stderr }));
  });
}

describe('README: the scripted-access shell example', function () {
  this.timeout(300_000);
  let server: TestServer;
  let work: string;

  before(async () => {
    server = await startTestServer({ env: { DEMO_DATA: 'off' } });
    work = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-readme-'));
  });
  after(async () => {
    await server?.close();
    if (work) fs.rmSync(work, { recursive: true, force: true });
  });

  it('uploads in chunks, queues a job and downloads the CSV with curl', async () => {
    const id = await server.createUser({ email: 'shell@example.org', password: 'shell-example-password', role: 'analyst' });
    expect(id).to.be.greaterThan(0);
    const user = await server.signIn({ email: 'shell@example.org', password: 'shell-example-password' });
    const tokenRes = await user.post('/api/tokens', { name: 'README example', scope: 'submit', expiresInDays: 1 });
    const { secret } = (await tokenRes.json()) as { secret: string };
    // the parameters the README shows beside the example
    const readme = fs.readFileSync(path.join(REPO_ROOT, 'README.md'), 'utf8');
    const params = /`(\{"schemaVersion":1[^`]*\})`/.exec(readme)![1];
    fs.writeFileSync(path.join(work, 'params.json'), params);
    fs.symlinkSync(path.join(REPO_ROOT, 'samples'), path.join(work, 'samples'));

    const result = await run(readmeExample(), work, { NULLSMITH_URL: server.url, NULLSMITH_TOKEN: secret });
    expect(result.code, result.stderr).to.equal(0);
    expect(result.stderr).to.match(/chunk 1\/1 sent/);
    const saved = /saved (job-(\d+)-sinr\.csv)/.exec(result.stdout);
    expect(saved, result.stdout).to.not.equal(null);
    const csv = fs.readFileSync(path.join(work, saved![1]), 'utf8');
    const lines = csv.trimEnd().split('\n');
    expect(csv).to.include(RESULTS_CAUTION.slice(0, 40));
    const data = lines.filter((l) => !l.startsWith('#'));
    expect(data.length).to.be.greaterThan(2); // header + at least two windows
    // the job was submitted with the token and audited as such
    await new Promise((r) => setTimeout(r, 200)); // audit entries are written as the response finishes
    const [entry] = await server.ctx.db.select().from(audit).where(and(eq(audit.action, 'job.submit'), eq(audit.target, `job:${saved![2]}`)));
    expect((entry.after as { via?: string }).via).to.match(/^token:/);
  });
});
