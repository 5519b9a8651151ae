/**
 * A real browser for the end-to-end suite: Debian's chromium driven by playwright-core
 * (never a downloaded browser), headless, in a fresh user-data dir per launch.
 *
 *   const browser = await launchBrowser({ baseUrl: server.url });
 *   await browser.page.goto(`${server.url}/sign-in`);
 *   await browser.screenshot('sign-in');           // tests/artifacts/sign-in.png
 *   expect(browser.problems()).to.deep.equal([]);  // console errors, CSP refusals, off-site requests
 *   await browser.close();
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { type BrowserContext, type Page, chromium } from 'playwright-core';

export const CHROMIUM_PATH = process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium';
export const ARTIFACTS_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', 'artifacts');

/** Flags for a quiet, offline-friendly headless chromium in a container. */
const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export interface BrowserOptions {
  /** Requests anywhere else (a CDN, a font host) are recorded as problems. */
  baseUrl: string;
  /** Default 1280×720, the smallest laptop screen we design for. */
  viewport?: { width: number; height: number };
}

export interface TestBrowser {
  context: BrowserContext;
  page: Page;
  /** Saves tests/artifacts/<name>.png (git-ignored) and returns its path. */
  screenshot(name: string): Promise<string>;
  /** Console errors, uncaught page errors, CSP refusals and requests that left baseUrl, in order. */
  problems(): string[];
  /** Forgets the problems seen so far (e.g. after a step that fails on purpose). */
  clearProblems(): void;
  close(): Promise<void>;
}

export async function launchBrowser(options: BrowserOptions): Promise<TestBrowser> {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(
      `No chromium at ${CHROMIUM_PATH}. Install it with "apt-get update && apt-get install -y chromium" ` +
        '(or set CHROMIUM_PATH), then run the browser suite again.',
    );
  }
  const userDataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-chromium-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport: options.viewport ?? { width: 1280, height: 720 },
    locale: 'en-GB',
    timezoneId: 'UTC',
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const seen: string[] = [];
  const origin = new URL(options.baseUrl).origin;
  context.on('request', (request) => {
    const url = request.url();
    if (!url.startsWith(origin) && !url.startsWith('data:') && !url.startsWith('blob:')) seen.push(`off-site request: ${url}`);
  });
  page.on('console', (message) => {
    if (message.type() === 'error') seen.push(`console error: ${message.text()}`);
  });
  page.on('pageerror', (error) => seen.push(`page error: ${error.message}`));

  return {
    context,
    page,
    async screenshot(name) {
      fs.mkdirSync(ARTIFACTS_DIR, { recursive: true });
      const file = path.join(ARTIFACTS_DIR, `${name}.png`);
      await page.screenshot({ path: file, fullPage: true });
      return file;
    },
    problems: () => [...seen],
    clearProblems: () => {
      seen.length = 0;
    },
    async close() {
      await context.close();
      fs.rmSync(userDataDir, { recursive: true, force: true });
    },
  };
}
