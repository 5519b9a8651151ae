/**
 * `npm test`: runs every suite (node mocha suites, the Angular unit tests, the browser
 * end-to-end suite) and ends with one plain line over all of them, `N passed, N failed`,
 * which CI reads. Exits non-zero when anything failed or a runner died without a summary.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';

interface Tally { passed: number; failed: number; ok: boolean }

function run(label: string, cmd: string, args: string[], parse: (out: string) => Tally | undefined, env: Record<string, string> = {}): Promise<Tally> {
  return new Promise((resolve) => {
    console.log(`\n=== ${label}: ${Object.entries(env).map(([k, v]) => `${k}=${v} `).join('')}${cmd} ${args.join(' ')}`);
    const child = spawn(cmd, args, { stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, FORCE_COLOR: '0', NO_COLOR: '1', ...env } });
    let out = '';
    child.stdout.on('data', (d: Buffer) => { process.stdout.write(d); out += d.toString(); });
    child.stderr.on('data', (d: Buffer) => { process.stderr.write(d); out += d.toString(); });
    child.on('close', (code) => {
      const t = parse(out);
      if (!t) {
        console.log(`!!! ${label}: no test summary found (exit code ${code}); counted as one failure`);
        resolve({ passed: 0, failed: 1, ok: false });
      } else {
        resolve({ ...t, ok: code === 0 && t.failed === 0 });
      }
    });
  });
}

const mochaSummary = (out: string): Tally | undefined => {
  const passing = /(\d+) passing/.exec(out);
  const failing = /(\d+) failing/.exec(out);
  if (!passing && !failing) return undefined;
  return { passed: passing ? Number(passing[1]) : 0, failed: failing ? Number(failing[1]) : 0, ok: true };
};

const vitestSummary = (out: string): Tally | undefined => {
  const line = /Tests\s+(.*)\n/.exec(out);
  if (!line) return undefined;
  const passed = /(\d+) passed/.exec(line[1]);
  const failed = /(\d+) failed/.exec(line[1]);
  return { passed: passed ? Number(passed[1]) : 0, failed: failed ? Number(failed[1]) : 0, ok: true };
};

const buildSummary = (out: string): Tally | undefined =>
  /Application bundle generation complete|Output location/.test(out) ? { passed: 0, failed: 0, ok: true } : undefined;

const hasFiles = (dir: string, suffix: string): boolean =>
  fs.existsSync(dir) && (fs.readdirSync(dir, { recursive: true }) as string[]).some((f) => f.endsWith(suffix));

const tallies: Tally[] = [];
tallies.push(await run('node suites', 'npx', ['mocha'], mochaSummary));
// The numeric core's published checks once more on its JavaScript kernels (the fallback when the
// SIMD module is missing), so both paths stay held to the same references.
tallies.push(await run('numeric core on the JavaScript kernels', 'npx', ['mocha', '--no-config', '--node-option', 'import=tsx', '--extension', 'ts', '--timeout', '60000', 'tests/dsp/**/*.test.ts', 'tests/worker/**/*.test.ts'], mochaSummary, { NULLSMITH_KERNELS: 'js' }));
if (hasFiles('src', '.spec.ts')) tallies.push(await run('angular unit tests', 'npx', ['ng', 'test', '--watch=false'], vitestSummary));
if (hasFiles('tests/e2e', '.test.ts')) {
  const build = await run('client build', 'npx', ['ng', 'build', '--configuration', 'production'], buildSummary);
  tallies.push(build);
  if (build.ok) tallies.push(await run('browser suite', 'npx', ['mocha', '--config', '.mocharc.e2e.json'], mochaSummary));
}

const passed = tallies.reduce((s, t) => s + t.passed, 0);
const failed = tallies.reduce((s, t) => s + t.failed, 0);
const allOk = tallies.every((t) => t.ok);
console.log('');
console.log(`${passed} passed, ${failed} failed`);
process.exit(allOk && failed === 0 ? 0 : 1);
