/**
 * The job runner end to end on real files: a tone-comb WAV written to a temp dir, read through
 * the worker's FrameSource, beamformed by the real engine, stored in result files, exported as
 * CSV. No part is replaced by a stand-in.
 */
import { expect } from 'chai';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { text } from 'node:stream/consumers';
import { lineArray, type ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import { beamformParamsSchema, type BeamformParamsInput } from '../../shared/params/beamform-params.js';
import { windowSpanS } from '../../shared/params/job-layout.js';
import { writeToneCombWav, type ToneSource } from '../../bench/scenario-tone-comb.js';
import { frameSourceOptionsFromArray, openFrameSource, readRecordingDescription } from '../../worker/io/index.js';
import { runBeamformJob, JobSetupError, type RunBeamformJobOptions } from '../../worker/runner/run-beamform-job.js';
import { exponentialScales } from '../../worker/runner/snapshot-ring.js';
import { createSinrCsvStream, createWeightsCsvStream } from '../../worker/results/csv-streams.js';
import { readWindowSummaries } from '../../worker/results/window-summaries.js';
import { truncateToCheckpoint } from '../../worker/results/result-writer.js';
import { RECORDS_FILE } from '../../worker/results/result-header.js';

const FS = 8000;
const array: ArrayGeometry = lineArray({ name: 'test line', count: 8, spacingM: 0.5, speedOfSoundMps: 1500 });
// Tones on bin centres of nfft 256 at 8 kHz (31.25 Hz bins: 22, 29, 38), below the λ/2 limit c/(2d) = 1500 Hz.
const TONES = [687.5, 906.25, 1187.5];

const baseParams: BeamformParamsInput = {
  schemaVersion: 1,
  nfft: 256,
  hop: 128,
  band: { fLoHz: 600, fHiHz: 1400 },
  snapshotsPerWindow: 32,
  windowHop: 16,
  loading: { kind: 'noise-floor', levelDb: 0 },
  beamformer: { kind: 'mpdr' },
  beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 2 },
  savedBeams: [{ azimuthDeg: 20 }, { azimuthDeg: -40 }],
};

let tmp: string;
before(async () => {
  tmp = await fs.mkdtemp(path.join(os.tmpdir(), 'ns-runner-'));
});
after(async () => {
  await fs.rm(tmp, { recursive: true, force: true });
});

async function scene(name: string, sources: ToneSource[], seconds = 4): Promise<string> {
  const file = path.join(tmp, `${name}.wav`);
  await writeToneCombWav(file, { sampleRate: FS, seconds, array, sources, noiseStd: 0.01, seed: 11 });
  return file;
}

async function run(wav: string, outDir: string, params: BeamformParamsInput, extra: Partial<RunBeamformJobOptions> = {}) {
  const d = await readRecordingDescription('wav', wav);
  const source = await openFrameSource(wav, d, frameSourceOptionsFromArray(array));
  try {
    return await runBeamformJob({ source, params: beamformParamsSchema.parse(params), array, outDir, ...extra });
  } finally {
    await source.close();
  }
}

function argmax(a: ArrayLike<number>): number {
  let k = 0;
  for (let i = 1; i < a.length; i++) if (a[i] > a[k]) k = i;
  return k;
}

describe('runner: bearing of a plane wave', function () {
  this.timeout(120000);

  it('puts the broadband power peak within one beam step of an off-grid true bearing (MPDR and conventional)', async () => {
    // Oracle: the scene's exact plane-wave delays τ_n = p_n·u/c (CONVENTIONS.md geometry; the
    // narrowband plane-wave model; common practice, see CONVENTIONS in the README).
    const truth = 23.3;
    const wav = await scene('off-grid', [{ azimuthDeg: truth, tonesHz: TONES, amplitude: 0.1 }]);
    for (const beamformer of [{ kind: 'mpdr' }, { kind: 'conventional' }] as const) {
      const out = path.join(tmp, `bearing-${beamformer.kind}`);
      const loading = beamformer.kind === 'conventional' ? { kind: 'none' as const } : baseParams.loading;
      const r = await run(wav, out, { ...baseParams, beamformer, loading });
      expect(r.status).to.equal('completed');
      const { summaries } = await readWindowSummaries(out);
      expect(summaries.length).to.equal(r.totalWindows);
      const az = r.header.setup.azimuthsDeg;
      for (const s of summaries) {
        const power = beamformer.kind === 'conventional' ? s.broadbandConventionalPower : s.broadbandAdaptivePower;
        expect(Math.abs(az[argmax(power)] - truth), `window ${s.window}`).to.be.at.most(2);
      }
    }
  });

  it('gives the conventional beam the tone power Harris predicts for a periodic Hann window', async () => {
    // Harris 1978 (Proc. IEEE 66(1), Table I): Hann coherent gain 0.5, so an on-bin tone of
    // amplitude A gives |X[k]| = (A/2)·(nfft/2) → (0.05·128)² = 40.96 = 16.124 dB; w = v/N on the
    // true bearing (on the fan) adds the element spectra coherently, so the beam shows the same.
    // White noise adds σ²·Σw²/N = 1e-4·96/8 ≈ 0.0012 (negligible, 1e-4 dB).
    const wav = await scene('on-grid', [{ azimuthDeg: 20, tonesHz: TONES, amplitude: 0.1 }]);
    const out = path.join(tmp, 'harris');
    await run(wav, out, { ...baseParams, beamformer: { kind: 'conventional' }, loading: { kind: 'none' } });
    const csv = await text(await createSinrCsvStream(out, { fromWindow: 2, toWindow: 2, comments: false }));
    const rows = csv.trim().split('\n').slice(1).map((l) => l.split(','));
    for (const f of ['687.5', '906.25', '1187.5']) {
      const row = rows.find((c) => c[3] === '20' && c[5] === f)!;
      expect(Number(row[8]), `${f} Hz`).to.be.closeTo(16.124, 0.02);
    }
  });

  it('trains MVDR on a noise-only span and estimates SINR on the bearing of the source', async () => {
    // Source off for the first 1.5 s (noise-only training span), then on at 20°.
    const wav = await scene('mvdr', [{ azimuthDeg: 20, tonesHz: TONES, amplitude: 0.1, onS: { startS: 1.5, endS: 99 } }], 5);
    const out = path.join(tmp, 'mvdr');
    const r = await run(wav, out, { ...baseParams, beamformer: { kind: 'mvdr', training: { source: 'range', startS: 0, endS: 1.5 } }, timeRange: { startS: 1.5, endS: 5 } });
    expect(r.header.training.weights!.frames).to.be.greaterThan(30);
    expect(r.header.training.evaluation!.firstSample).to.be.greaterThan(r.header.training.weights!.firstSample + r.header.training.weights!.frames * 128);
    const { summaries } = await readWindowSummaries(out);
    const az = r.header.setup.azimuthsDeg;
    for (const s of summaries) {
      const peak = argmax(s.broadbandAdaptivePower);
      expect(az[peak]).to.equal(20);
      // Capon (1969): for one plane wave in white noise the distortionless beam on the source
      // passes σs² + σ²/N, the same as the conventional beam (DOMAIN.md §2 [C]); MVDR weights
      // trained on white noise are ≈ v/N, so both powers agree closely.
      const ratioDb = 10 * Math.log10(s.broadbandAdaptivePower[peak] / s.broadbandConventionalPower[peak]);
      expect(Math.abs(ratioDb)).to.be.below(0.5);
      expect(s.broadbandSinr[peak]).to.be.greaterThan(10);
    }
    // Window times start at the processed range (1.5 s = sample 12000), per CONVENTIONS.md.
    expect(summaries[0].tStartS).to.equal(1.5);
    expect(summaries[1].tEndS).to.equal((12000 + (16 + 31) * 128 + 256) / FS);
  });

  it('refuses parameters that cannot run on the recording, naming the field, before touching the output', async () => {
    const wav = await scene('short', [{ azimuthDeg: 0, tonesHz: [1000], amplitude: 0.1 }], 0.5);
    const out = path.join(tmp, 'refused');
    let err: unknown;
    try {
      await run(wav, out, { ...baseParams, band: { fLoHz: 600, fHiHz: 5000 } });
    } catch (e) {
      err = e;
    }
    expect(err).to.be.instanceOf(JobSetupError);
    const problems = (err as JobSetupError).problems;
    expect(problems.map((p) => p.path.join('.'))).to.include.members(['band.fHiHz', 'snapshotsPerWindow']);
    await fs.access(out).then(
      () => expect.fail('output directory should not exist'),
      () => undefined,
    );
  });
});

describe('runner: stopping, checkpoints and resuming', function () {
  this.timeout(120000);
  let wav: string;
  let fullDir: string;
  before(async () => {
    wav = await scene('resume', [{ azimuthDeg: -40, tonesHz: TONES, amplitude: 0.05 }], 6);
    fullDir = path.join(tmp, 'full');
    await run(wav, fullDir, baseParams);
  });

  it('stops within one window of an abort and reports a durable checkpoint', async () => {
    const out = path.join(tmp, 'aborted');
    const ac = new AbortController();
    const checkpoints: number[] = [];
    const r = await run(wav, out, baseParams, {
      signal: ac.signal,
      checkpointIntervalMs: 60000,
      onCheckpoint: (j) => void checkpoints.push(j),
      onWindowDone: (j) => {
        if (j === 5) ac.abort();
      },
    });
    expect(r.status).to.equal('aborted');
    expect(r.windowsDone).to.equal(6);
    expect(checkpoints).to.deep.equal([5]);
    const size = (await fs.stat(path.join(out, RECORDS_FILE))).size;
    expect(size).to.equal(6 * r.header.records.bytesPerWindow);
  });

  it('writes byte-identical CSVs after a crash past the checkpoint and a resume', async () => {
    const out = path.join(tmp, 'resumed');
    const ac = new AbortController();
    let last = -1;
    await run(wav, out, baseParams, {
      signal: ac.signal,
      checkpointIntervalMs: 0,
      onCheckpoint: (j) => void (last = j),
      onWindowDone: (j) => {
        if (j === 9) ac.abort();
      },
    });
    expect(last).to.equal(9);
    // A crash after the checkpoint: half a record of garbage past window 7's end, checkpoint at 7.
    const { records } = JSON.parse(await fs.readFile(path.join(out, 'run.json'), 'utf8')) as { records: { bytesPerWindow: number } };
    const fh = await fs.open(path.join(out, RECORDS_FILE), 'r+');
    await fh.truncate(8 * records.bytesPerWindow);
    await fh.write(Buffer.alloc(records.bytesPerWindow / 2, 0xab), 0, records.bytesPerWindow / 2, 8 * records.bytesPerWindow);
    await fh.close();
    const r = await run(wav, out, baseParams, { resumeFromWindow: 8 });
    expect(r.status).to.equal('completed');
    expect(r.windowsComputed).to.equal(r.totalWindows - 8);
    for (const make of [createSinrCsvStream, createWeightsCsvStream]) {
      const a = await text(await make(fullDir));
      const b = await text(await make(out));
      expect(b.length).to.be.greaterThan(1000);
      expect(b === a, `${make.name} differs`).to.equal(true);
    }
  });

  it('refuses to resume onto results made with other parameters', async () => {
    const out = path.join(tmp, 'other');
    await run(wav, out, baseParams, { checkpointIntervalMs: 0 });
    let err: Error | undefined;
    try {
      await run(wav, out, { ...baseParams, snapshotsPerWindow: 48 }, { resumeFromWindow: 2 });
    } catch (e) {
      err = e as Error;
    }
    expect(err?.message).to.match(/other parameters/);
  });

  it('truncateToCheckpoint refuses a checkpoint the records do not reach', async () => {
    const out = path.join(tmp, 'aborted');
    let err: Error | undefined;
    try {
      await truncateToCheckpoint(out, 40);
    } catch (e) {
      err = e as Error;
    }
    expect(err?.message).to.match(/holds only 6 whole records/);
  });
});

describe('runner: exponential forgetting weights', () => {
  it('reproduce the recursion R_m = α·R_{m−1} + (1−α)·x·xᴴ over K snapshots, renormalised', () => {
    // DOMAIN.md §2 (exponential forgetting): unrolling the recursion from R = 0 K frames back gives
    // weights (1−α)·α^(K−1−k); their sum is 1 − α^K. The engine computes (1/K)·Σ|g_k x_k|², so
    // g_k² / K must equal (1−α)·α^(K−1−k) / (1 − α^K).
    const K = 40;
    const alpha = 0.93;
    const g = exponentialScales(K, alpha);
    let r = 0; // scalar recursion on |x|² = 1 per frame
    const weights: number[] = [];
    for (let k = 0; k < K; k++) {
      weights.forEach((w, i) => (weights[i] = w * alpha));
      weights.push(1 - alpha);
      r = alpha * r + (1 - alpha);
    }
    const total = 1 - Math.pow(alpha, K);
    expect(r).to.be.closeTo(total, 1e-12);
    for (let k = 0; k < K; k++) expect((g[k] * g[k]) / K).to.be.closeTo(weights[k] / total, 1e-12);
  });
});

describe('runner: window spans', () => {
  it('follow CONVENTIONS.md: t_start = j·whop·hop/fs, t_end = ((j·whop+K−1)·hop+nfft)/fs', () => {
    const t = { sampleRate: 8000, nfft: 512, hop: 256, snapshotsPerWindow: 64, windowHop: 32, firstSample: 0 };
    expect(windowSpanS(3, t)).to.deep.equal({ startS: (3 * 32 * 256) / 8000, endS: ((3 * 32 + 63) * 256 + 512) / 8000 });
  });
});
