/**
 * Streaming readers. Reference values: the independent `wavefile` 11 decoder (npm), scaled by
 * CONVENTIONS.md's full-scale divisors; sha256 from node:crypto over the whole file.
 */
import { expect } from 'chai';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseWavHeader } from '../../shared/formats/wav-header.js';
import { openFrameSource } from '../../worker/io/open-frame-source.js';
import { scanRecording } from '../../worker/io/scan-recording.js';
import { inspectTask } from '../../worker/tasks/inspect.js';
import { readRecordingDescription } from '../../worker/io/read-recording-description.js';
import { frameSourceOptionsFromArray } from '../../worker/io/element-routing.js';
import { generateScenario } from '../../samples/scenario/generate-scenario.js';
import { arrayGeometrySchema } from '../../shared/arrays/array-geometry.js';
import { wavefileBytes, wavefileDecode } from '../shared/formats-test-helpers.js';

const FULL = { '8': 128, '16': 32768, '24': 8388608, '32': 2147483648, '32f': 1, '64': 1 } as const;

describe('openFrameSource', () => {
  let dir: string;
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'ns-io-'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  for (const bd of ['8', '16', '24', '32', '32f', '64'] as const) {
    it(`${bd}-bit WAV: values equal wavefile's decode / full scale (small buffer forces many reads)`, async () => {
      const ch = 5;
      const frames = 2001;
      const bytes = wavefileBytes(bd, ch, frames);
      const path = join(dir, `w${bd}.wav`);
      writeFileSync(path, bytes);
      const d = parseWavHeader(bytes, bytes.length, 'w.wav');
      const src = await openFrameSource(path, d, { bufferBytes: 1000 });
      const out = Array.from({ length: ch }, () => new Float64Array(frames));
      expect(await src.read(0, frames, out)).to.equal(frames);
      const ref = wavefileDecode(bytes);
      for (let c = 0; c < ch; c++) {
        for (let i = 0; i < frames; i++) {
          const expected = bd === '8' ? (ref[c][i] - 128) / 128 : ref[c][i] / FULL[bd];
          if (out[c][i] !== expected) expect.fail(`channel ${c} frame ${i}: ${out[c][i]} ≠ ${expected}`);
        }
      }
      await src.close();
    });
  }

  it('applies the channel map, exclusions and gains, and reads any frame range', async () => {
    const bytes = wavefileBytes('16', 4, 500);
    const path = join(dir, 'map.wav');
    writeFileSync(path, bytes);
    const d = parseWavHeader(bytes, bytes.length, 'map.wav');
    const ref = wavefileDecode(bytes);
    // Elements 0..3 fed by file channels 2, 0, 3, 1; element 1 excluded; element gains.
    const src = await openFrameSource(path, d, { elementChannels: [2, 0, 3, 1], excludedElements: [1], elementGains: [2, 9, 0.5, 1] });
    expect(src.channels).to.equal(3);
    expect(src.elements).to.deep.equal([0, 2, 3]);
    const out = Array.from({ length: 3 }, () => new Float64Array(50));
    expect(await src.read(470, 50, out)).to.equal(30); // only 30 frames remain
    for (let i = 0; i < 30; i++) {
      expect(out[0][i]).to.equal((2 * ref[2][470 + i]) / 32768);
      expect(out[1][i]).to.equal((0.5 * ref[3][470 + i]) / 32768);
      expect(out[2][i]).to.equal(ref[1][470 + i] / 32768);
    }
    expect(await src.read(500, 10, out)).to.equal(0);
    await src.close();
  });

  it('refuses bad maps and bad reads with clear messages', async () => {
    const bytes = wavefileBytes('16', 2, 10);
    const path = join(dir, 'bad.wav');
    writeFileSync(path, bytes);
    const d = parseWavHeader(bytes, bytes.length, 'bad.wav');
    for (const [opts, msg] of [
      [{ elementChannels: [0, 5] }, /channels 0 to 1/],
      [{ elementChannels: [1, 1] }, /feeds two elements/],
      [{ excludedElements: [0, 1] }, /Every element is excluded/],
      [{ elementGains: [1, -1] }, /gains must be positive/],
    ] as const) {
      let err: unknown;
      await openFrameSource(path, d, opts).catch((e: unknown) => (err = e));
      expect(String(err)).to.match(msg);
    }
    const src = await openFrameSource(path, d);
    let err: unknown;
    await src.read(0, 10, [new Float64Array(10)]).catch((e: unknown) => (err = e));
    expect(String(err)).to.match(/2 output arrays are needed/);
    await src.close();
    writeFileSync(path, bytes.subarray(0, bytes.length - 4));
    await openFrameSource(path, d).catch((e: unknown) => (err = e));
    expect(String(err)).to.match(/truncated after inspection/);
  });

  it('SigMF complex and raw planar round trips through the generator and readRecordingDescription', async () => {
    const sig = generateScenario({ outDir: join(dir, 'sig'), durationS: 0.5, channels: 3, spacingM: 0.5, sampleRate: 2000, format: 'sigmf', encoding: 'f32', complex: true, centerFrequencyHz: 750 });
    const dSig = await readRecordingDescription('sigmf', sig.dataFile, { path: sig.dataFile.replace('.sigmf-data', '.sigmf-meta') });
    expect(dSig).to.include({ complex: true, channels: 3, frames: 1000, centerFrequencyHz: 750, datatype: 'cf32_le' });
    expect(dSig.sha512).to.equal(createHash('sha512').update(readFileSync(sig.dataFile)).digest('hex'));
    const sSig = await openFrameSource(sig.dataFile, dSig);
    const z = Array.from({ length: 3 }, () => new Float64Array(2 * 1000));
    expect(await sSig.read(0, 1000, z)).to.equal(1000);
    const raw = new Float32Array(readFileSync(sig.dataFile).buffer.slice(0));
    // Channel 1, frame 10: (I, Q) at float index (10·3 + 1)·2.
    expect(z[1][20]).to.equal(raw[62]);
    expect(z[1][21]).to.equal(raw[63]);
    await sSig.close();

    const pl = generateScenario({ outDir: join(dir, 'pl'), durationS: 0.25, channels: 3, spacingM: 0.5, sampleRate: 8000, format: 'raw', encoding: 'i16', layout: 'planar' });
    const dPl = await readRecordingDescription('raw', pl.dataFile, { path: `${pl.dataFile}.json` });
    expect(dPl).to.include({ layout: 'planar', frames: 2000 });
    const sPl = await openFrameSource(pl.dataFile, dPl, { bufferBytes: 512 });
    const y = Array.from({ length: 3 }, () => new Float64Array(100));
    await sPl.read(1900, 100, y);
    const i16 = new Int16Array(readFileSync(pl.dataFile).buffer.slice(0));
    expect(y[2][5]).to.equal(i16[2 * 2000 + 1905] / 32768);
    await sPl.close();
  });

  it('builds options from an array description (array.json of the demo set)', async () => {
    const array = arrayGeometrySchema.parse(JSON.parse(readFileSync('samples/demo/array.json', 'utf8')));
    array.elements[3].excluded = true;
    const opts = frameSourceOptionsFromArray(array);
    const d = await readRecordingDescription('wav', 'samples/demo/gannet-ledge-8ch.wav');
    const src = await openFrameSource('samples/demo/gannet-ledge-8ch.wav', d, opts);
    expect(src.channels).to.equal(7);
    await src.close();
  });
});

describe('scanRecording', () => {
  it('sha256 equals node:crypto over the file; QC flags the dead element and clipping', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'ns-scan-'));
    try {
      const r = generateScenario({ outDir: dir, durationS: 0.5, channels: 4, spacingM: 0.5, sampleRate: 8000, format: 'wav', encoding: 'i16', clip: true, deadChannel: 2 });
      const d = await readRecordingDescription('wav', r.dataFile);
      const progress: number[] = [];
      const scan = await scanRecording(r.dataFile, d, { bufferBytes: 4096, onProgress: (f) => progress.push(f) });
      expect(scan.sha256).to.equal(createHash('sha256').update(readFileSync(r.dataFile)).digest('hex'));
      expect(progress.at(-1)).to.equal(1);
      expect(scan.qc[2]).to.include({ dead: true, flat: true, rms: 0 });
      expect(scan.qc[0].dead).to.equal(false);
      expect(scan.qc[0].clipped).to.be.greaterThan(0);
      expect(scan.qc.reduce((s, q) => s + q.clipped, 0)).to.be.at.most(r.clippedValues + 4 * 4000);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('checks a SigMF core:sha512 against the data file: equal passes, different rejects with both digests (SigMF core spec, global core:sha512)', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'ns-scan512-'));
    try {
      const r = generateScenario({ outDir: dir, durationS: 0.25, channels: 2, spacingM: 0.5, sampleRate: 2000, format: 'sigmf', encoding: 'f32', complex: true, centerFrequencyHz: 500 });
      const metaPath = r.dataFile.replace('.sigmf-data', '.sigmf-meta');
      const meta = readFileSync(metaPath, 'utf8');
      const d = await readRecordingDescription('sigmf', r.dataFile, { path: metaPath });
      const scan = await scanRecording(r.dataFile, d, { bufferBytes: 1000 });
      const truth = createHash('sha512').update(readFileSync(r.dataFile)).digest('hex');
      expect(scan.sha512).to.equal(truth);
      expect(d.sha512).to.equal(truth);
      const ctx = { signal: new AbortController().signal, progress: () => undefined };
      const payload = { recordingId: 1, filePath: r.dataFile, name: 'x.sigmf-data', declaredFormat: 'sigmf' as const, sidecar: meta, expectedSha256: null };
      expect((await inspectTask.run(payload, ctx)).reasons).to.deep.equal([]);
      const wrong = truth.replace(/^./, truth[0] === '0' ? '1' : '0');
      const bad = await inspectTask.run({ ...payload, sidecar: meta.replace(truth, wrong) }, ctx);
      expect(bad.reasons).to.have.length(1);
      expect(bad.reasons[0]).to.contain(`hashes to sha512 ${truth}, not the core:sha512 ${wrong}`).and.match(/matching \.sigmf-data and \.sigmf-meta/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

