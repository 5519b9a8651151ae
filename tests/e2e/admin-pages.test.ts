/**
 * The admin, audit, profile and API pages in a real browser against the real server process:
 * an admin invites someone (the invitation shows in the Outbox), changes a setting, reads the
 * audit log; an analyst turns on the digest and creates an API token (shown once) that then
 * works with curl-like fetch; the invited person sets a password through the one-time link.
 */
import { expect } from 'chai';
import { type TestBrowser, launchBrowser } from './helpers/browser.js';
import { type ServerProcess, assertClientBuilt, startServerProcess } from './helpers/server-process.js';

const ADMIN = { email: 'admin@demo.nullsmith', password: 'nullsmith-admin' };
const ANALYST = { email: 'analyst@demo.nullsmith', password: 'nullsmith-analyst' };

const unexpected = (b: TestBrowser) => b.problems().filter((p) => !/status of 40[13]/.test(p));

describe('admin, profile and API pages in the browser', function () {
  let server: ServerProcess;
  let browser: TestBrowser | undefined;

  before(async function () {
    assertClientBuilt();
    server = await startServerProcess();
  });
  after(async function () {
    await server?.stop();
  });
  afterEach(async function () {
    await browser?.close();
    browser = undefined;
  });

  async function signedIn(who: { email: string; password: string }, path: string): Promise<TestBrowser> {
    browser = await launchBrowser({ baseUrl: server.url });
    const { page } = browser;
    await page.goto(`${server.url}${path}`);
    await page.getByLabel('E-mail').fill(who.email);
    await page.getByLabel('Password', { exact: true }).fill(who.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(`${server.url}${path}`);
    return browser;
  }

  it('admin invites a person, the link arrives in the Outbox and sets the password', async function () {
    const b = await signedIn(ADMIN, '/admin');
    const { page } = b;
    await page.getByRole('heading', { name: 'Accounts' }).waitFor();
    await page.getByLabel('Name').fill('Shearwater Survey');
    await page.getByLabel('E-mail').fill('shearwater@example.org');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByText('Invitation mailed to shearwater@example.org').waitFor();
    await b.screenshot('admin-accounts');

    await page.getByRole('tab', { name: 'Outbox' }).click();
    await page.waitForURL(/\/admin\/outbox$/);
    // The invitation's own panel: job-outcome mails from other suites may have arrived since.
    const invitation = page.locator('mat-expansion-panel').filter({ hasText: 'You are invited to Nullsmith' }).filter({ hasText: 'shearwater@example.org' }).first();
    await invitation.locator('mat-expansion-panel-header').click();
    // textContent, not innerText: innerText of a panel still collapsing or expanding (visibility
    // hidden) is empty.
    const body = (await invitation.locator('pre.body').textContent()) ?? '';
    const found = /(https?:\/\/\S+\/set-password\/nsl_\S+)/.exec(body);
    expect(found, `no set-password link in the invitation body: ${JSON.stringify(body)}`).to.not.equal(null);
    const link = found![1];
    await b.screenshot('admin-outbox');

    await page.getByRole('tab', { name: 'Settings' }).click();
    await page.getByLabel('Keep results (days, 0 = for ever)').fill('90');
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByText('Saved and applied.').waitFor();
    await b.screenshot('admin-settings');

    await page.getByRole('tab', { name: 'Audit log' }).click();
    await page.waitForURL(/\/audit$/);
    await page.getByText('settings.change').first().waitFor();
    await page.getByText('user.invite').first().waitFor();
    await b.screenshot('audit-log');
    expect(unexpected(b)).to.deep.equal([]);
    await b.close();

    // the invited person follows the link (same origin as the server)
    const path = new URL(link).pathname;
    browser = await launchBrowser({ baseUrl: server.url });
    await browser.page.goto(`${server.url}${path}`);
    await browser.page.getByText('Welcome, Shearwater Survey').waitFor();
    await browser.page.getByLabel('New password').fill('shearwater-password');
    await browser.page.getByRole('button', { name: 'Set password' }).click();
    const outcome = browser.page.locator('main [role="status"], main [role="alert"]').first();
    await outcome.waitFor();
    expect(await outcome.innerText()).to.match(/Your password is set\./);
    expect(unexpected(browser)).to.deep.equal([]);
  });

  it('analyst turns on the digest and creates a token that works once copied', async function () {
    const b = await signedIn(ANALYST, '/profile');
    const { page } = b;
    await page.getByRole('heading', { name: 'API tokens' }).waitFor();
    await page.getByRole('switch').click();
    await page.getByLabel('Where it is used').fill('field laptop');
    await page.getByRole('button', { name: 'Create token' }).click();
    const secret = (await page.locator('.secret code').innerText()).trim();
    expect(secret).to.match(/^nsk_/);
    await b.screenshot('profile-tokens');
    const me = await fetch(`${server.url}/api/profile`, { headers: { authorization: `Bearer ${secret}` } });
    expect(((await me.json()) as { dailyDigest: boolean }).dailyDigest).to.equal(true);

    await page.goto(`${server.url}/api-docs`);
    await page.getByRole('heading', { name: 'Jobs', level: 2 }).waitFor();
    await page.getByText('/api/jobs/{id}/sinr.csv').waitFor();
    await b.screenshot('api-docs');
    expect(unexpected(b)).to.deep.equal([]);
  });
});
