/**
 * Sign-in through the real client in a real browser against the real server process:
 * the demo accounts (server/auth/demo-accounts.ts), the shell each role sees, sign-out,
 * a wrong password, and the rule that nothing is fetched from outside our own origin.
 */
import { expect } from 'chai';
import { type TestBrowser, launchBrowser } from './helpers/browser.js';
import { type ServerProcess, assertClientBuilt, startServerProcess } from './helpers/server-process.js';

const ANALYST = { email: 'analyst@demo.nullsmith', password: 'nullsmith-analyst' };
const ADMIN = { email: 'admin@demo.nullsmith', password: 'nullsmith-admin' };

/**
 * Problems except chromium's console line for a 401 answer: signed out, the start-up probe
 * GET /api/auth/me and a refused sign-in answer 401 by contract, and chromium logs every
 * non-2xx resource as a console error.
 */
function unexpectedProblems(b: TestBrowser): string[] {
  return b.problems().filter((p) => !/Failed to load resource: the server responded with a status of 401/.test(p));
}

describe('sign-in in the browser', function () {
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

  async function open(viewport?: { width: number; height: number }): Promise<TestBrowser> {
    browser = await launchBrowser({ baseUrl: server.url, viewport });
    return browser;
  }

  async function signIn(b: TestBrowser, who: { email: string; password: string }): Promise<void> {
    await b.page.getByLabel('E-mail').fill(who.email);
    await b.page.getByLabel('Password', { exact: true }).fill(who.password);
    await b.page.getByRole('button', { name: 'Sign in' }).click();
  }

  it('analyst signs in, sees the shell without Admin, and signs out', async function () {
    const b = await open();
    const { page } = b;
    await page.goto(`${server.url}/recordings`);
    // Signed out: the guard sends us to sign in and remembers where we were going.
    await page.waitForURL(/\/sign-in\?returnTo=%2Frecordings$/);
    await page.getByRole('heading', { name: 'Sign in' }).waitFor();
    await b.screenshot('sign-in-page');

    await signIn(b, ANALYST);
    await page.waitForURL(`${server.url}/recordings`);
    await page.getByRole('heading', { name: 'Recordings', level: 1 }).waitFor();

    expect(await page.locator('.product-name').textContent()).to.equal('Nullsmith');
    expect(await page.getByTestId('signed-in-user').innerText()).to.contain('Demo analyst');
    expect((await page.getByTestId('signed-in-role').innerText()).toLowerCase()).to.equal('analyst');
    const nav = page.getByRole('navigation', { name: 'Main' });
    expect(await nav.getByRole('link').allInnerTexts()).to.deep.equal(['radar\nJobs', 'upload_file\nRecordings', 'scatter_plot\nArrays', 'badge\nProfile', 'data_object\nAPI']);
    expect(await nav.getByRole('link', { name: 'Admin' }).count()).to.equal(0);
    expect(await page.getByText('outputs are analysis aids').isVisible()).to.equal(true);
    await b.screenshot('shell-analyst-recordings');

    await nav.getByRole('link', { name: 'Jobs' }).click();
    await page.waitForURL(`${server.url}/jobs`);
    await page.getByText('No jobs yet').waitFor();
    expect(await nav.getByRole('link', { name: 'Jobs' }).getAttribute('aria-current')).to.equal('page');
    await b.screenshot('shell-analyst-jobs');

    // Wide screens: the menu button folds the navigation to an icon rail and back.
    await page.getByRole('button', { name: 'Fold navigation' }).click();
    await nav.getByText('Recordings').waitFor({ state: 'hidden' });
    expect(await nav.getByRole('link').count()).to.equal(5);
    await b.screenshot('shell-folded-rail');
    await page.getByRole('button', { name: 'Expand navigation' }).click();
    await nav.getByText('Recordings').waitFor({ state: 'visible' });

    // An analyst typing the admin address is turned back with a message naming the role.
    await page.goto(`${server.url}/admin`);
    await page.waitForURL(`${server.url}/jobs`);
    await page.getByText('That page needs the admin role').waitFor();

    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(`${server.url}/sign-in`);
    // The session is gone on the server too: a deep link asks for sign-in again.
    await page.goto(`${server.url}/jobs`);
    await page.waitForURL(/\/sign-in\?returnTo=%2Fjobs$/);
    expect(unexpectedProblems(b)).to.deep.equal([]);
  });

  it('a wrong password shows the server message and keeps the user on the form', async function () {
    const b = await open();
    const { page } = b;
    await page.goto(`${server.url}/sign-in`);

    // Empty submit: the shared zod rules speak before anything is sent.
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByText('Enter your e-mail address.').waitFor();
    await page.getByText('Enter your password.').waitFor();

    await signIn(b, { email: ANALYST.email, password: 'not-the-password' });
    const alert = page.getByTestId('sign-in-error');
    await alert.waitFor();
    expect(await alert.innerText()).to.contain('E-mail or password is wrong.');
    expect(page.url()).to.equal(`${server.url}/sign-in`);
    expect(await page.getByRole('button', { name: 'Sign in' }).isEnabled()).to.equal(true);
    await b.screenshot('sign-in-wrong-password');
    expect(unexpectedProblems(b)).to.deep.equal([]);
  });

  it('admin sees Admin and opens it', async function () {
    const b = await open();
    const { page } = b;
    await page.goto(`${server.url}/sign-in`);
    await signIn(b, ADMIN);
    await page.waitForURL(`${server.url}/jobs`);
    const nav = page.getByRole('navigation', { name: 'Main' });
    await nav.getByRole('link', { name: 'Admin' }).click();
    await page.waitForURL(`${server.url}/admin`);
    await page.getByRole('heading', { name: 'Admin', level: 1 }).waitFor();
    // The accounts table comes from GET /api/users: the three demo accounts.
    const table = page.getByRole('table');
    await table.getByRole('cell', { name: 'analyst@demo.nullsmith' }).waitFor();
    expect(await table.getByRole('row').count()).to.equal(4);
    expect((await page.getByTestId('signed-in-role').innerText()).toLowerCase()).to.equal('admin');
    await b.screenshot('shell-admin');
    expect(unexpectedProblems(b)).to.deep.equal([]);
  });

  it('on a narrow screen the navigation folds into a drawer behind the menu button', async function () {
    const b = await open({ width: 800, height: 700 });
    const { page } = b;
    await page.goto(`${server.url}/sign-in`);
    await signIn(b, ANALYST);
    await page.waitForURL(`${server.url}/jobs`);
    const recordingsLink = page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Recordings' });
    expect(await recordingsLink.isVisible()).to.equal(false);
    await page.getByRole('button', { name: 'Open navigation' }).click();
    await recordingsLink.waitFor({ state: 'visible' });
    // Let the drawer finish sliding in before the picture is taken.
    const drawer = page.locator('#ns-navigation');
    for (let tries = 0; (await drawer.boundingBox())?.x !== 0 && tries < 50; tries++) await page.waitForTimeout(50);
    await b.screenshot('shell-narrow-drawer');
    await recordingsLink.click();
    await page.waitForURL(`${server.url}/recordings`);
    await recordingsLink.waitFor({ state: 'hidden' });
    expect(unexpectedProblems(b)).to.deep.equal([]);
  });
});
