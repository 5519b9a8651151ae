/**
 * The upload flow in a real browser against the real server process: a file with a broken
 * header is refused in the browser with the parser's reason before a byte is sent; a small
 * WAV goes through chunked upload with a progress bar, is inspected in a compute child and its
 * detail page shows the per-channel check. Screenshots go to tests/artifacts/.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { type TestBrowser, launchBrowser } from './helpers/browser.js';
import { type ServerProcess, assertClientBuilt, startServerProcess } from './helpers/server-process.js';
import { writeWav } from '../server/helpers/upload-fixtures.js';

const ANALYST = { email: 'analyst@demo.nullsmith', password: 'nullsmith-analyst' };

describe('upload flow in the browser', function () {
  this.timeout(300_000);
  let server: ServerProcess;
  let browser: TestBrowser;
  let tmp: string;

  before(async () => {
    assertClientBuilt();
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-e2e-upl-'));
    server = await startServerProcess();
    browser = await launchBrowser({ baseUrl: server.url });
  });
  after(async () => {
    await browser?.close();
    await server?.stop();
    fs.rmSync(tmp, { recursive: true, force: true });
  });

  it('refuses a bad header before sending, uploads a good WAV with progress and shows its QC', async () => {
    const { page } = browser;
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill(ANALYST.email);
    await page.getByLabel('Password', { exact: true }).fill(ANALYST.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
    await page.goto(`${server.url}/recordings`);

    const bad = path.join(tmp, 'broken-header.wav');
    await writeWav(bad, 2, 8000, 800, () => 0.1);
    const bytes = fs.readFileSync(bad);
    bytes.writeUInt16LE(0, 22); // nChannels = 0
    fs.writeFileSync(bad, bytes);
    let uploadCalls = 0;
    page.on('request', (r) => {
      if (r.url().includes('/api/uploads')) uploadCalls++;
    });
    await page.getByTestId('upload-input').setInputFiles(bad);
    const refused = page.getByTestId('upload-refused');
    await refused.waitFor();
    expect(await refused.textContent()).to.match(/broken-header\.wav.*0 channels/);
    expect(uploadCalls).to.equal(0);

    const good = path.join(tmp, 'mooring-check.wav');
    await writeWav(good, 4, 8000, 16000, (c, i) => (c === 3 ? 0 : 0.2 * Math.sin((2 * Math.PI * (300 + 50 * c) * i) / 8000)));
    await page.getByTestId('upload-input').setInputFiles(good);
    await page.locator('[data-testid="upload-item"][data-state="done"]').waitFor({ timeout: 120_000 });
    expect(uploadCalls).to.be.greaterThan(2); // session, chunk(s), complete
    await browser.screenshot('upload-done');

    await page.getByRole('link', { name: 'Open' }).first().click();
    await page.locator('[data-testid="recording-facts"] [data-state="ready"]').waitFor({ timeout: 120_000 });
    const qc = page.getByTestId('qc-table');
    await qc.waitFor();
    const rows = await qc.locator('tr').allTextContents();
    expect(rows).to.have.length(5); // header + 4 channels
    expect(rows[4]).to.match(/dead/);
    await browser.screenshot('recording-detail');
    expect(browser.problems().filter((p) => !/status of 401/.test(p))).to.deep.equal([]);
  });
});
