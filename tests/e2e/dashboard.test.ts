/**
 * The live dashboard in a real browser against the real server process: an analyst uploads the
 * small demo recording, queues a job from the form, watches progress reach 100 % live (no
 * reload), opens the bearing–time map and downloads weights.csv; operations reprioritises a
 * queued job and cancels a running one. Measures the time from a node's progress write to its
 * display in the browser. Screenshots of each page go to tests/artifacts/.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import type { Page } from 'playwright-core';
import { demoJobParams } from '../../server/demo/demo-job-params.js';
import { type TestBrowser, launchBrowser } from './helpers/browser.js';
import { REPO_ROOT, type ServerProcess, assertClientBuilt, startServerProcess } from './helpers/server-process.js';

const ANALYST = { email: 'analyst@demo.nullsmith', password: 'nullsmith-analyst' };
const OPS = { email: 'ops@demo.nullsmith', password: 'nullsmith-ops' };

/** Chromium logs every non-2xx resource; 401 (start-up probe) and 409 (no results yet) are contract answers. */
const unexpected = (b: TestBrowser) => b.problems().filter((p) => !/status of (401|409)/.test(p));

async function signIn(page: Page, base: string, who: { email: string; password: string }): Promise<void> {
  await page.goto(`${base}/sign-in`);
  await page.getByLabel('E-mail').fill(who.email);
  await page.getByLabel('Password', { exact: true }).fill(who.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
}

/** JSON API call from inside the signed-in browser context (cookies + CSRF header). */
async function api<T>(page: Page, method: 'GET' | 'POST', url: string, data?: unknown): Promise<T> {
  const xsrf = (await page.context().cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
  const res = await page.request.fetch(url, { method, data, headers: { 'X-XSRF-TOKEN': xsrf } });
  if (!res.ok()) throw new Error(`${method} ${url}: ${res.status()} ${await res.text()}`);
  return (await res.json()) as T;
}

async function until<T>(what: string, fn: () => Promise<T | undefined>, timeoutMs = 180_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/** Picks a mat-select option by visible text. */
async function choose(page: Page, label: string | RegExp, option: string | RegExp): Promise<void> {
  await page.getByRole('combobox', { name: label }).click();
  await page.getByRole('option', { name: option }).first().click();
}

/**
 * Opens the job form and waits until it has suggested a job name from its first recording, so a
 * name typed afterwards is not raced by that suggestion.
 */
async function openJobForm(page: Page, base: string): Promise<void> {
  await page.goto(`${base}/jobs/new`);
  await until('the suggested job name', async () => ((await page.getByTestId('job-name').inputValue()) ? true : undefined), 30_000);
}

describe('live dashboard in the browser', function () {
  this.timeout(600_000);
  let server: ServerProcess;
  const browsers: TestBrowser[] = [];
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-dash-'));

  before(async function () {
    assertClientBuilt();
    // A loaded machine can miss the helper's 60 s start-up window once: try a second time.
    server = await startServerProcess({ env: { DEMO_JOB: 'on' } }).catch(() => startServerProcess({ env: { DEMO_JOB: 'on' } }));
  });
  after(async function () {
    for (const b of browsers) await b.close();
    await server?.stop();
    fs.rmSync(tmp, { recursive: true, force: true });
  });

  let analystJobId = 0;

  it('analyst uploads, queues a job, watches it live to 100 %, opens the map and downloads weights.csv', async function () {
    const b = await launchBrowser({ baseUrl: server.url, viewport: { width: 1440, height: 900 } });
    browsers.push(b);
    const { page } = b;
    await signIn(page, server.url, ANALYST);

    // The finished demo job (queued at first start through the real queue) is listed.
    await page.goto(`${server.url}/jobs`);
    await page.getByTestId('live-indicator').and(page.locator('[data-status="live"]')).waitFor();
    await page.getByText('Gannet Ledge transit: MPDR bearing sweep').waitFor({ timeout: 120_000 });

    // Upload the small demo recording under a new name.
    const file = path.join(tmp, 'ledge-check-upload.wav');
    fs.copyFileSync(path.join(REPO_ROOT, 'samples/demo/gannet-ledge-8ch.wav'), file);
    await page.goto(`${server.url}/recordings`);
    await page.getByTestId('upload-input').setInputFiles(file);
    await page.locator('[data-testid="upload-item"][data-state="done"]').waitFor({ timeout: 120_000 });
    const rec = await until('upload inspected', async () => {
      const r = await api<{ items: { id: number; name: string; state: string }[] }>(page, 'GET', `${server.url}/api/recordings?q=ledge-check`);
      const item = r.items.find((i) => i.name === 'ledge-check-upload.wav');
      if (item?.state === 'rejected') throw new Error('upload rejected');
      return item?.state === 'ready' ? item : undefined;
    });

    // The job form, checked as we type, with the advisor.
    await openJobForm(page, server.url);
    await choose(page, 'Recording', /ledge-check-upload\.wav/);
    await choose(page, 'Array', /Gannet Ledge/);
    await page.getByTestId('job-name').fill('Ledge check: live watch');
    await page.getByTestId('job-k').fill('4');
    await page.getByTestId('advisor-warning').first().waitFor();
    expect(await page.getByTestId('advisor').innerText()).to.match(/Elements N\s+8/);
    expect(await page.getByText(/K = 4 is below 2N = 16/).count()).to.be.greaterThan(0);
    await page.getByTestId('job-k').fill('32');
    await page.getByLabel('Window hop (frames)').fill('1');
    // A fine fan (721 beams) under a white-noise-gain floor just below the 8-element maximum
    // (every bin bisects its loading over most beams) keeps the job running for many progress
    // ticks even on the SIMD engine: about 15 s of work here (2026-12-03), records as before.
    await page.getByLabel('Step (°)').fill('0.25');
    await choose(page, 'Diagonal loading', 'White-noise-gain floor (dB)');
    await page.getByLabel('Level (dB)').fill('9');
    await page.getByTestId('job-saved').fill('-38, 21, 52');
    await page.getByTestId('job-saved').blur();
    await b.screenshot('job-form');
    // Record every progress change the page shows, with the browser's clock.
    // (a string, so the test runner's transpiler adds no helpers the page does not have)
    await page.evaluate(`
      window.nsSeen = [];
      new MutationObserver(function () {
        var el = document.querySelector('[data-testid="results-progress"]');
        if (el) window.nsSeen.push({ at: Date.now(), updatedAt: el.getAttribute('data-updated-at') || '', percent: el.getAttribute('data-percent') || '' });
      }).observe(document.body, { subtree: true, attributes: true, attributeFilter: ['data-updated-at'], childList: true });
    `);
    await page.getByTestId('submit-job').click();
    await page.waitForURL(/\/jobs\/\d+$/);
    analystJobId = Number(new URL(page.url()).pathname.split('/').pop());
    expect(rec.id).to.be.a('number');
    await page.locator('[data-testid="results-progress"][data-percent="100"]').waitFor({ timeout: 180_000 });
    await page.getByTestId('results-state').getByText('Succeeded').waitFor();
    const seen = (await page.evaluate('window.nsSeen')) as { at: number; updatedAt: string; percent: string }[];
    const percents = [...new Set(seen.map((s) => Number(s.percent)))];
    expect(percents.length, `progress steps seen live: ${percents.join(', ')}`).to.be.greaterThan(2);
    const lat = [...new Map(seen.filter((s) => s.updatedAt).map((s) => [s.updatedAt, s.at - Date.parse(s.updatedAt)])).values()].sort((a, c) => a - c);
    const q = (p: number) => lat[Math.min(lat.length - 1, Math.floor(p * lat.length))];
    console.log(`      progress write → browser display: n=${lat.length}, median ${q(0.5)} ms, p90 ${q(0.9)} ms, max ${lat[lat.length - 1]} ms`);
    fs.mkdirSync(path.join(REPO_ROOT, 'tests/artifacts'), { recursive: true });
    fs.writeFileSync(path.join(REPO_ROOT, 'tests/artifacts/progress-latency.json'), JSON.stringify({ samplesMs: lat }, null, 1));

    // Bearing–time map filled with every window.
    const map = page.getByTestId('bearing-time-map');
    await map.scrollIntoViewIfNeeded();
    const total = (await api<{ job: { totalWindows: number } }>(page, 'GET', `${server.url}/api/jobs/${analystJobId}`)).job.totalWindows;
    await page.locator(`[data-testid="bearing-time-map"][data-windows="${total}"]`).waitFor();
    await page.getByText(/Nulls \(≥ 25 dB below the peak\)/).waitFor();
    await b.screenshot('results-page');
    await page.getByRole('heading', { name: /SINR track/ }).scrollIntoViewIfNeeded();
    await b.screenshot('results-plots');
    await page.getByRole('heading', { name: /Adapted pattern/ }).scrollIntoViewIfNeeded();
    await b.screenshot('results-pattern-table');
    await page.getByRole('heading', { name: /Downloads/ }).scrollIntoViewIfNeeded();
    await b.screenshot('results-downloads-run');

    // Download weights.csv through the page's link.
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('download-weights').click()]);
    expect(download.suggestedFilename()).to.equal(`nullsmith-job-${analystJobId}-ledge-check-live-watch-weights.csv`);
    const saved = path.join(tmp, 'weights.csv');
    await download.saveAs(saved);
    const text = fs.readFileSync(saved, 'utf8');
    expect(text).to.match(/^# Nullsmith adaptive beamforming results/);
    expect(text).to.include('window,t_start_s,t_end_s,freq_hz,azimuth_deg,elevation_deg,channel,weight_re,weight_im');
    expect(unexpected(b).slice(0, 8)).to.deep.equal([]);
  });

  it('operations reprioritises a queued job and cancels a running one', async function () {
    const b = await launchBrowser({ baseUrl: server.url, viewport: { width: 1440, height: 1000 } });
    browsers.push(b);
    const { page } = b;
    await signIn(page, server.url, OPS);
    const recs = await api<{ items: { id: number; name: string }[] }>(page, 'GET', `${server.url}/api/recordings?q=gannet-ledge-8ch.wav`);
    const recordingId = recs.items.find((r) => r.name === 'gannet-ledge-8ch.wav')!.id;
    // A long job and one queued behind it (one compute slot). Length comes from work that writes
    // nothing extra: a white-noise-gain floor 0.03 dB under the 8-element maximum makes every bin
    // bisect its loading over most beams (about 35 s of work on the SIMD engine, 2026-12; the job is
    // cancelled after about 10 s). A finer fan or hop would also lengthen it but multiply the records.
    const long = { ...demoJobParams(1), hop: 16, loading: { kind: 'wng-floor' as const, minWngDb: 9 } };
    const running = await api<{ job: { id: number } }>(page, 'POST', `${server.url}/api/jobs`, { name: 'Long sweep to cancel', recordingId, params: long });
    const queued = await api<{ job: { id: number } }>(page, 'POST', `${server.url}/api/jobs`, { name: 'Waiting sweep', recordingId, params: demoJobParams() });
    await page.goto(`${server.url}/jobs`);
    await page.getByTestId(`state-${running.job.id}`).getByText('Running').waitFor({ timeout: 60_000 });
    // Reprioritise the queued job.
    const prio = page.getByTestId(`priority-${queued.job.id}`);
    await prio.fill('7');
    await prio.press('Enter');
    await page.getByText('Priority of “Waiting sweep” is now 7.').waitFor();
    expect((await api<{ job: { priority: number } }>(page, 'GET', `${server.url}/api/jobs/${queued.job.id}`)).job.priority).to.equal(7);
    // Progress latency on the jobs table too: node's progress write (updatedAt) → cell update.
    await page.evaluate(`
      window.nsCell = [];
      new MutationObserver(function (records) {
        records.forEach(function (r) {
          var el = r.target;
          if (el.getAttribute && el.getAttribute('data-testid') === 'progress-${running.job.id}') window.nsCell.push({ at: Date.now(), updatedAt: el.getAttribute('data-updated-at') });
        });
      }).observe(document.body, { subtree: true, attributes: true, attributeFilter: ['data-updated-at'] });
    `);
    await page.waitForTimeout(6000);
    const cell = (await page.evaluate('window.nsCell')) as { at: number; updatedAt: string }[];
    const lat = cell.map((c) => c.at - Date.parse(c.updatedAt)).sort((a, c) => a - c);
    console.log(`      jobs table, progress write → cell: n=${lat.length}, median ${lat[Math.floor(lat.length / 2)]} ms, max ${lat[lat.length - 1]} ms`);
    expect(lat.length, 'live progress updates in 6 s').to.be.greaterThan(3);
    const file = path.join(REPO_ROOT, 'tests/artifacts/progress-latency.json');
    const before = fs.existsSync(file) ? (JSON.parse(fs.readFileSync(file, 'utf8')) as { samplesMs: number[] }).samplesMs : [];
    fs.writeFileSync(file, JSON.stringify({ samplesMs: before, jobsTableMs: lat }, null, 1));

    await page.getByText('Worker nodes').scrollIntoViewIfNeeded();
    await b.screenshot('jobs-page-operations');

    // Cancel the running job, confirming first.
    await page.getByTestId(`cancel-${running.job.id}`).click();
    await page.getByTestId('confirm').click();
    await page.getByTestId(`state-${running.job.id}`).getByText('Cancelled').waitFor({ timeout: 60_000 });
    await page.getByTestId(`state-${queued.job.id}`).getByText(/Running|Succeeded/).waitFor({ timeout: 60_000 });
    await b.screenshot('jobs-page-after-cancel');
    expect(unexpected(b).slice(0, 8)).to.deep.equal([]);
  });

  it('operations opens a batch from the jobs table and cancels its unfinished jobs', async function () {
    const b = await launchBrowser({ baseUrl: server.url, viewport: { width: 1440, height: 1000 } });
    browsers.push(b);
    const { page } = b;
    await signIn(page, server.url, OPS);
    const recs = await api<{ items: { id: number; name: string; state: string }[] }>(page, 'GET', `${server.url}/api/recordings?q=gannet-ledge-8ch`);
    const pick = (name: string) => recs.items.find((r) => r.name === name)!.id;
    const recordingIds = [pick('gannet-ledge-8ch.wav'), pick('gannet-ledge-8ch-planar.raw')];
    // Held for the night (runAfter far ahead), so both are still waiting when cancelled.
    const made = await api<{ batch: { id: number }; jobs: { id: number }[] }>(page, 'POST', `${server.url}/api/jobs/batch`, {
      name: 'Night pass',
      recordingIds,
      params: demoJobParams(),
      runAfter: '2099-01-01T00:00:00Z',
    });
    await page.goto(`${server.url}/jobs`);
    await page.getByTestId(`batch-of-${made.jobs[0].id}`).click();
    const strip = page.getByTestId('batch-strip');
    await strip.getByText(`Batch ${made.batch.id}`).waitFor();
    await strip.getByText('Scheduled 2').waitFor();
    expect(new URL(page.url()).searchParams.get('batch')).to.equal(String(made.batch.id));
    expect(await page.locator('tr[data-job]').count()).to.equal(2);
    await b.screenshot('jobs-page-batch');
    await page.getByTestId('cancel-batch').click();
    await page.getByTestId('confirm').click();
    await page.getByText(`Batch ${made.batch.id}: 2 queued jobs cancelled.`).waitFor();
    for (const j of made.jobs) await page.getByTestId(`state-${j.id}`).getByText('Cancelled').waitFor({ timeout: 30_000 });
    await strip.getByText('Cancelled 2').waitFor();
    expect(await page.getByTestId('cancel-batch').count()).to.equal(0);
    await page.getByTestId('clear-batch').click();
    expect(new URL(page.url()).searchParams.get('batch')).to.equal(null);
    expect(unexpected(b).slice(0, 8)).to.deep.equal([]);
  });

  it('admin sets up an archive folder and queues a batch over it from the job form', async function () {
    const b = await launchBrowser({ baseUrl: server.url, viewport: { width: 1440, height: 1100 } });
    browsers.push(b);
    const { page } = b;
    await signIn(page, server.url, { email: 'admin@demo.nullsmith', password: 'nullsmith-admin' });
    // Two copies of the demo WAV in a survey folder on the server's disk.
    const disk = path.join(tmp, 'survey-disk');
    fs.mkdirSync(path.join(disk, 'leg-b'), { recursive: true });
    for (const name of ['dip-01.wav', 'dip-02.wav']) fs.copyFileSync(path.join(REPO_ROOT, 'samples/demo/gannet-ledge-8ch.wav'), path.join(disk, 'leg-b', name));
    const root = await api<{ id: number }>(page, 'POST', `${server.url}/api/archives`, { name: 'Survey disk', path: disk });
    const reg = await api<{ registered: { id: number }[] }>(page, 'POST', `${server.url}/api/archives/${root.id}/register`, { folder: 'leg-b', pattern: '*.wav' });
    expect(reg.registered).to.have.length(2);
    await until('archive recordings ready', async () => {
      const r = await api<{ items: { name: string; state: string }[] }>(page, 'GET', `${server.url}/api/recordings?q=dip-0`);
      return r.items.filter((i) => i.state === 'ready').length === 2 ? true : undefined;
    }, 120_000);

    await openJobForm(page, server.url);
    await page.getByTestId('job-name').fill('Leg B dips');
    await page.getByTestId('job-run-on').getByText('An archive folder').click();
    await choose(page, 'Archive root', /Survey disk/);
    await page.getByTestId('job-archive-folder').fill('leg-b');
    await page.getByTestId('job-archive-pattern').fill('dip-*.wav');
    // archive-registered files are not linked to an array: pick the demo array for the batch
    await choose(page, 'Array', /elements/);
    await page.getByLabel('Start after (your time)').fill('2099-01-01T00:00');
    await b.screenshot('job-form-folder-batch');
    await page.getByTestId('submit-job').click();
    // The jobs appear in the API once the form's request went through; a refusal stays on the
    // form with the server's reasons, which the failure then shows.
    type Listed = { name: string; batchId: number | null; state: string };
    const mine = await until('the folder batch to be queued', async () => {
      const listed = await api<{ items: Listed[] }>(page, 'GET', `${server.url}/api/jobs?limit=100`);
      const found = listed.items.filter((j) => j.name.startsWith('Leg B dips'));
      return found.length >= 2 ? found : undefined;
    }, 60_000).catch(async (e: Error) => {
      const why = await page.getByTestId('server-problems').innerText({ timeout: 1000 }).catch(() => '(no refusal shown on the form)');
      await b.screenshot('job-form-folder-batch-not-queued');
      throw new Error(`${e.message}: ${why}`);
    });
    await page.waitForURL((u) => u.pathname === '/jobs');
    expect(mine.map((j) => j.name).sort()).to.deep.equal(['Leg B dips · dip-01.wav', 'Leg B dips · dip-02.wav']);
    expect(new Set(mine.map((j) => j.batchId)).size).to.equal(1);
    expect(mine.every((j) => j.state === 'scheduled')).to.equal(true);
    await api(page, 'POST', `${server.url}/api/jobs/batches/${mine[0].batchId}/cancel`);
    expect(unexpected(b).slice(0, 8)).to.deep.equal([]);
  });
});
