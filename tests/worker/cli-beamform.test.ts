/**
 * `npm run beamform` end to end on the committed demo recording, as a spawned process.
 */
import { expect } from 'chai';
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';

const DEMO = path.resolve('samples/demo');

function beamform(args: string[]): Promise<{ code: number | null; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ['--import', 'tsx', 'worker/cli/beamform.ts', ...args], { stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('close', (code) => resolve({ code, stderr }));
  });
}

describe('CLI: npm run beamform', function () {
  this.timeout(120000);
  let tmp: string;
  let arrayFile: string;
  let paramsFile: string;
  const params = {
    schemaVersion: 1,
    nfft: 256,
    hop: 128,
    band: { fLoHz: 1000, fHiHz: 1400 },
    snapshotsPerWindow: 48,
    windowHop: 24,
    loading: { kind: 'noise-floor', levelDb: 0 },
    beamformer: { kind: 'mpdr' },
    beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 2 },
    savedBeams: [{ azimuthDeg: 52 }],
  };

  before(async () => {
    tmp = await fs.mkdtemp(path.join(os.tmpdir(), 'ns-cli-'));
    // The demo scene has a dead hydrophone on channel 6 (samples/demo/scenario.json): exclude it,
    // as an engineer would, so the adaptive beam sees a consistent array.
    const array = JSON.parse(await fs.readFile(path.join(DEMO, 'array.json'), 'utf8')) as { elements: { excluded?: boolean }[] };
    array.elements[6].excluded = true;
    arrayFile = path.join(tmp, 'array.json');
    await fs.writeFile(arrayFile, JSON.stringify(array));
    paramsFile = path.join(tmp, 'params.json');
    await fs.writeFile(paramsFile, JSON.stringify(params));
  });
  after(async () => {
    await fs.rm(tmp, { recursive: true, force: true });
  });

  it('writes run.json, weights.csv and sinr.csv for the demo WAV and finds the broadband source bearing', async () => {
    const out = path.join(tmp, 'out');
    const wav = path.join(DEMO, 'gannet-ledge-8ch.wav');
    const r = await beamform([wav, '--array', arrayFile, '--params', paramsFile, '--out', out]);
    expect(r.code, r.stderr).to.equal(0);
    expect(r.stderr).to.match(/window \d+\/\d+ .*real time, ETA/);
    expect(r.stderr).to.include('CAUTION: Analysis aid only');

    const run = JSON.parse(await fs.readFile(path.join(out, 'run.json'), 'utf8')) as {
      conventionsVersion: string;
      params: typeof params;
      meta: { software: { version: string }; inputs: { recording: { sha256: string } } };
    };
    expect(run.conventionsVersion).to.equal('1');
    expect(run.params).to.deep.include({ nfft: 256, snapshotsPerWindow: 48 });
    const pkg = JSON.parse(await fs.readFile('package.json', 'utf8')) as { version: string };
    expect(run.meta.software.version).to.equal(pkg.version);
    // SHA-256 as node:crypto (OpenSSL, FIPS 180-4) computes it.
    expect(run.meta.inputs.recording.sha256).to.equal(createHash('sha256').update(await fs.readFile(wav)).digest('hex'));

    const sinr = (await fs.readFile(path.join(out, 'sinr.csv'), 'utf8')).split('\n');
    const header = sinr.findIndex((l) => !l.startsWith('# '));
    expect(sinr[header]).to.equal('window,t_start_s,t_end_s,azimuth_deg,elevation_deg,freq_hz,sinr_db,capon_power_db,conventional_power_db,wng_db,loading');
    const weights = (await fs.readFile(path.join(out, 'weights.csv'), 'utf8')).split('\n');
    expect(weights[weights.findIndex((l) => !l.startsWith('# '))]).to.equal('window,t_start_s,t_end_s,freq_hz,azimuth_deg,elevation_deg,channel,weight_re,weight_im');

    // Truth (samples/demo/scenario.json): the only source in 1000–1400 Hz is the broadband
    // tender at 52°. The broadband Capon peak of every window must sit within one 2° step of it.
    const broadband = sinr.slice(header + 1).filter((l) => l && l.split(',')[5] === '').map((l) => l.split(','));
    const byWindow = new Map<string, { az: number; p: number }>();
    for (const c of broadband) {
      const best = byWindow.get(c[0]);
      if (!best || Number(c[7]) > best.p) byWindow.set(c[0], { az: Number(c[3]), p: Number(c[7]) });
    }
    expect(byWindow.size).to.be.greaterThan(5);
    for (const [w, best] of byWindow) expect(Math.abs(best.az - 52), `window ${w}`).to.be.at.most(2);
  });

  it('refuses bad inputs with messages that name the field, and exit codes 1 (input) or 2 (usage)', async () => {
    const wav = path.join(DEMO, 'gannet-ledge-8ch.wav');
    const bad = path.join(tmp, 'bad.json');
    await fs.writeFile(bad, JSON.stringify({ ...params, nfft: 300 }));
    let r = await beamform([wav, '--array', arrayFile, '--params', bad, '--out', path.join(tmp, 'x')]);
    expect(r.code).to.equal(1);
    expect(r.stderr).to.match(/nfft: nfft must be a power of two/);

    await fs.writeFile(bad, JSON.stringify({ ...params, band: { fLoHz: 1000, fHiHz: 4500 } }));
    r = await beamform([wav, '--array', arrayFile, '--params', bad, '--out', path.join(tmp, 'x')]);
    expect(r.code).to.equal(1);
    expect(r.stderr).to.match(/band\.fHiHz: 4500 Hz is above the Nyquist frequency 4000 Hz/);

    r = await beamform([path.join(tmp, 'missing.wav'), '--array', arrayFile, '--params', paramsFile, '--out', path.join(tmp, 'x')]);
    expect(r.code).to.equal(1);
    expect(r.stderr).to.match(/no file at/);

    r = await beamform(['--array', arrayFile]);
    expect(r.code).to.equal(2);
    expect(r.stderr).to.match(/give the recording to process/);
    await fs.access(path.join(tmp, 'x')).then(
      () => expect.fail('nothing should be written for refused inputs'),
      () => undefined,
    );
  });
});
