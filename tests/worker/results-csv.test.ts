/**
 * Result files and CSV exports: exact header lines, filters, deterministic number formatting,
 * summaries read back from the records. Results come from a real run (tone-comb WAV → runner).
 */
import { expect } from 'chai';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { text } from 'node:stream/consumers';
import { lineArray } from '../../shared/arrays/array-geometry.js';
import { beamformParamsSchema } from '../../shared/params/beamform-params.js';
import { RESULTS_CAUTION } from '../../shared/params/result-caution.js';
import { writeToneCombWav } from '../../bench/scenario-tone-comb.js';
import { frameSourceOptionsFromArray, openFrameSource, readRecordingDescription } from '../../worker/io/index.js';
import { runBeamformJob } from '../../worker/runner/run-beamform-job.js';
import { createSinrCsvStream, createWeightsCsvStream, SINR_CSV_COLUMNS, WEIGHTS_CSV_COLUMNS } from '../../worker/results/csv-streams.js';
import { beamsAt, binsBetween, CsvFilterError } from '../../worker/results/csv-filter.js';
import { decibels, fixedTrimmed, significant } from '../../worker/results/csv-number-format.js';
import { readHeader } from '../../worker/results/result-header.js';
import { readWindowSummaries } from '../../worker/results/window-summaries.js';
import { recordLayout } from '../../worker/results/record-layout.js';

const array = lineArray({ name: 'csv line', count: 6, spacingM: 0.5, speedOfSoundMps: 1500 });
let tmp: string;
let dir: string;

before(async function () {
  this.timeout(60000);
  tmp = await fs.mkdtemp(path.join(os.tmpdir(), 'ns-results-'));
  const wav = path.join(tmp, 'scene.wav');
  await writeToneCombWav(wav, { sampleRate: 8000, seconds: 2, array, sources: [{ azimuthDeg: 30, tonesHz: [750, 1000], amplitude: 0.1 }], noiseStd: 0.01, seed: 3 });
  const d = await readRecordingDescription('wav', wav);
  const source = await openFrameSource(wav, d, frameSourceOptionsFromArray(array));
  dir = path.join(tmp, 'out');
  await runBeamformJob({
    source,
    array,
    outDir: dir,
    params: beamformParamsSchema.parse({
      schemaVersion: 1,
      nfft: 256,
      hop: 128,
      band: { fLoHz: 700, fHiHz: 1100 },
      snapshotsPerWindow: 24,
      windowHop: 12,
      loading: { kind: 'trace', levelDb: -20 },
      beamformer: { kind: 'mpdr' },
      beams: { azimuthFromDeg: -60, azimuthToDeg: 60, azimuthStepDeg: 10 },
      savedBeams: [{ azimuthDeg: 30 }, { azimuthDeg: -20 }],
    }),
  });
  await source.close();
});
after(async () => {
  await fs.rm(tmp, { recursive: true, force: true });
});

const lines = (s: string) => s.split('\n').filter((l) => l.length > 0);
const dataRows = (s: string) => lines(s).filter((l) => !l.startsWith('#')).slice(1);

describe('result files: CSV exports', function () {
  this.timeout(60000);

  it('start with "# " comment lines (product, conventions, caution) and then exactly the documented header', async () => {
    for (const [make, columns] of [[createWeightsCsvStream, WEIGHTS_CSV_COLUMNS], [createSinrCsvStream, SINR_CSV_COLUMNS]] as const) {
      const all = lines(await text(await make(dir)));
      const firstData = all.findIndex((l) => !l.startsWith('# '));
      expect(firstData).to.be.greaterThan(2);
      expect(all[0]).to.match(/^# Nullsmith /);
      expect(all.slice(0, firstData).join('\n')).to.include('Conventions version 1').and.include(`CAUTION: ${RESULTS_CAUTION}`);
      expect(all[firstData]).to.equal(columns);
      const plain = lines(await text(await make(dir, { comments: false })));
      expect(plain[0]).to.equal(columns);
    }
    // Column lists as specified for the exports (product contract).
    expect(WEIGHTS_CSV_COLUMNS).to.equal('window,t_start_s,t_end_s,freq_hz,azimuth_deg,elevation_deg,channel,weight_re,weight_im');
    expect(SINR_CSV_COLUMNS).to.equal('window,t_start_s,t_end_s,azimuth_deg,elevation_deg,freq_hz,sinr_db,capon_power_db,conventional_power_db,wng_db,loading');
  });

  it('has one broadband row (freq_hz empty) per window and beam, then one row per bin', async () => {
    const h = await readHeader(dir);
    const rows = dataRows(await text(await createSinrCsvStream(dir))).map((l) => l.split(','));
    const nBins = h.setup.bins.length;
    const nBeams = h.setup.azimuthsDeg.length;
    expect(rows.length).to.equal(h.timing.windows * nBeams * (nBins + 1));
    expect(rows.every((r) => r.length === 11)).to.equal(true);
    const broadband = rows.filter((r) => r[5] === '');
    expect(broadband.length).to.equal(h.timing.windows * nBeams);
    expect(broadband.every((r) => r[9] === '' && r[10] === '')).to.equal(true);
  });

  it('writes weights whose beam output is distortionless: Σ conj(w_n)·v_n = 1 (Capon 1969; CONVENTIONS.md)', async () => {
    // v_n = exp(+j2πf·x_n·sin(az)/c) for a line array along x at elevation 0 (CONVENTIONS.md).
    const rows = dataRows(await text(await createWeightsCsvStream(dir, { fromWindow: 1, toWindow: 1 }))).map((l) => l.split(','));
    const groups = new Map<string, string[][]>();
    for (const r of rows) groups.set(`${r[3]}|${r[4]}`, [...(groups.get(`${r[3]}|${r[4]}`) ?? []), r]);
    expect(groups.size).to.be.greaterThan(2);
    for (const [key, g] of groups) {
      const [f, az] = key.split('|').map(Number);
      let re = 0;
      let im = 0;
      for (const r of g) {
        const x = 0.5 * Number(r[6]);
        const ph = (2 * Math.PI * f * x * Math.sin((az * Math.PI) / 180)) / 1500;
        const wr = Number(r[7]);
        const wi = Number(r[8]);
        // conj(w)·v = (wr − j·wi)(cos ph + j·sin ph)
        re += wr * Math.cos(ph) + wi * Math.sin(ph);
        im += wr * Math.sin(ph) - wi * Math.cos(ph);
      }
      expect(re, key).to.be.closeTo(1, 1e-5);
      expect(im, key).to.be.closeTo(0, 1e-5);
    }
  });

  it('filters by window range, beams and bins, giving exactly the matching rows of the full export', async () => {
    const h = await readHeader(dir);
    const full = dataRows(await text(await createSinrCsvStream(dir)));
    const beams = beamsAt(h, [30, -20]);
    const bins = binsBetween(h, 740, 1010);
    const part = dataRows(await text(await createSinrCsvStream(dir, { fromWindow: 1, toWindow: 2, beams, bins })));
    const expected = full.filter((l) => {
      const c = l.split(',');
      const inBins = c[5] === '' || bins.some((b) => fixedTrimmed(h.setup.binFreqsHz[b], 6) === c[5]);
      return ['1', '2'].includes(c[0]) && ['30', '-20'].includes(c[3]) && inBins;
    });
    expect(part).to.deep.equal(expected);
    expect(part.length).to.equal(2 * 2 * (bins.length + 1));
    const w = dataRows(await text(await createWeightsCsvStream(dir, { beams: beamsAt(h, [-20]), bins: [0] })));
    expect(w.length).to.equal(h.timing.windows * h.setup.channels);
    expect(w.every((l) => l.split(',')[4] === '-20')).to.equal(true);
  });

  it('refuses bad filters with clear messages before streaming anything', async () => {
    const h = await readHeader(dir);
    const cases: [() => Promise<unknown>, RegExp][] = [
      [() => createSinrCsvStream(dir, { toWindow: 999 }), /toWindow 999 is not stored yet/],
      [() => createSinrCsvStream(dir, { beams: [500] }), /beam 500 does not exist/],
      [() => createSinrCsvStream(dir, { fromWindow: 3, toWindow: 1 }), /before fromWindow/],
      [() => createWeightsCsvStream(dir, { beams: beamsAt(h, [0]) }), /no saved weights; saved beams are/],
      [() => Promise.resolve(binsBetween(h, 3000, 3500)), /no processed bin/],
      [() => createSinrCsvStream(path.join(tmp, 'nothing-here')), /no result header/],
    ];
    for (const [fn, re] of cases) {
      let err: unknown;
      try {
        await fn();
      } catch (e) {
        err = e;
      }
      expect(err, String(re)).to.be.instanceOf(Error);
      expect((err as Error).message).to.match(re);
    }
    expect(new CsvFilterError('x')).to.be.instanceOf(Error);
  });

  it('reads per-window summaries from the record prefix, matching the broadband rows of sinr.csv', async () => {
    const h = await readHeader(dir);
    const { summaries, windowsStored } = await readWindowSummaries(dir, { stride: 2 });
    expect(windowsStored).to.equal(h.timing.windows);
    expect(summaries.map((s) => s.window)).to.deep.equal(Array.from({ length: Math.ceil(windowsStored / 2) }, (_, i) => 2 * i));
    const beam = beamsAt(h, [30])[0];
    const row = dataRows(await text(await createSinrCsvStream(dir, { fromWindow: 2, toWindow: 2, beams: [beam], bins: [] })))[0].split(',');
    expect(decibels(summaries[1].broadbandAdaptivePower[beam])).to.equal(row[7]);
    expect(summaries[1].eigenvalues.length).to.equal(h.setup.bins.length * h.setup.channels);
    expect(summaries[1].eigenvalues[0]).to.be.at.least(summaries[1].eigenvalues[1]);
  });
});

describe('result files: layout and number formatting', () => {
  it('sizes every record from the setup alone', () => {
    const l = recordLayout({ bins: 84, beams: 91, saved: 8, channels: 32 });
    // 3 broadband arrays per beam, 6 per-bin scalars, eigenvalues, 6 bin×beam arrays, complex weights.
    expect(l.floatsPerWindow).to.equal(3 * 91 + 6 * 84 + 84 * 32 + 6 * 84 * 91 + 84 * 8 * 32 * 2);
    expect(l.bytesPerWindow).to.equal(4 * l.floatsPerWindow);
    expect(l.fields[0].offset).to.equal(0);
  });

  it('formats numbers deterministically and writes missing values as empty fields', () => {
    expect(fixedTrimmed(0.032, 9)).to.equal('0.032');
    expect(fixedTrimmed(2, 3)).to.equal('2');
    expect(fixedTrimmed(-0.0000001, 3)).to.equal('0');
    expect(significant(Math.fround(0.1))).to.equal('0.1');
    expect(significant(1.2345e-7)).to.equal('1.2345e-7');
    expect(significant(NaN)).to.equal('');
    expect(decibels(100)).to.equal('20');
    expect(decibels(0)).to.equal('');
    expect(decibels(-1)).to.equal('');
  });
});
