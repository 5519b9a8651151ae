/**
 * npm run bench [-- --minutes 10] [--csv]
 *
 * Runs the standard scenario (bench/scenario-standard.ts) through the real job runner on one
 * core and prints: real-time factor (recording seconds per wall second), peak RSS
 * (process.resourceUsage().maxRSS), and the time shares read / FFT / assemble / covariance /
 * solve / output. Targets: ≥ 20× real time, RSS < 300 MB (use --minutes 120 for the 2-hour
 * memory check). --csv also times the streaming sinr.csv and weights.csv export.
 *
 * The covariance and solve shares come from the runner's stage timer (the engine times its own
 * covariance step, which reuses the groups of snapshots shared with the previous window).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { frameSourceOptionsFromArray, openFrameSource, readRecordingDescription } from '../worker/io/index.js';
import { createSinrCsvStream, createWeightsCsvStream } from '../worker/results/csv-streams.js';
import { runBeamformJob } from '../worker/runner/run-beamform-job.js';
import { standardParams, standardRecording } from './scenario-standard.js';

const OUT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), 'out');

const { values } = parseArgs({ options: { minutes: { type: 'string', default: '10' }, csv: { type: 'boolean', default: false } } });
const minutes = Number(values.minutes);
if (!(minutes > 0)) {
  console.error(`bench: --minutes must be a positive number, got "${values.minutes}"`);
  process.exit(2);
}

const rec = standardRecording(OUT, minutes);
const description = await readRecordingDescription(rec.wavPath.endsWith('.wav') ? 'wav' : 'rf64', rec.wavPath);
const source = await openFrameSource(rec.wavPath, description, frameSourceOptionsFromArray(rec.array));
const resultsDir = path.join(OUT, `results-${minutes}min`);
const params = standardParams;

const rssBefore = process.resourceUsage().maxRSS;
const cpuBefore = process.cpuUsage();
let lastPrint = 0;
const run = await runBeamformJob({
  source,
  params,
  array: rec.array,
  outDir: resultsDir,
  onWindowDone: (j, total) => {
    const now = Date.now();
    if (now - lastPrint < 3000) return;
    lastPrint = now;
    process.stderr.write(`window ${j + 1}/${total}\n`);
  },
});
await source.close();
const cpu = process.cpuUsage(cpuBefore);
const cpuS = (cpu.user + cpu.system) / 1e6;
const peakRssMb = process.resourceUsage().maxRSS / 1024;

const nBins = run.header.setup.bins.length;
const t = run.times;
const shares: [string, number][] = [
  ['read (decode samples)', t.readMs],
  ['FFT (window, transform, bins)', t.fftMs],
  ['assemble (order snapshots)', t.assembleMs],
  ['covariance (sliding groups)', t.covarianceMs],
  ['solve (loading, Cholesky, eig, beams)', t.solveMs],
  ['output (records, fsync)', t.outputMs],
];
const accounted = shares.reduce((s, [, v]) => s + v, 0);
const wallS = run.wallMs / 1000;
const recordingS = run.recordingSecondsProcessed;
const resultBytes = fs.statSync(path.join(resultsDir, 'windows.f32')).size;

console.log(`Nullsmith benchmark, standard scenario (${minutes} min recording${rec.generatedNow ? ', generated this run' : ', cached'})`);
console.log(`  32 elements × 0.5 m, fs 8 kHz, 16-bit; nfft 512, hop 256, ${nBins} bins (200–1500 Hz), K 64, window hop 32, 91 beams, MPDR, loading −10 dB re noise floor, 8 saved beams`);
console.log(`  windows ${run.windowsComputed}, recording ${recordingS.toFixed(1)} s, wall ${wallS.toFixed(2)} s (Node ${process.version}, one core)`);
console.log(`  real-time factor      ${(recordingS / wallS).toFixed(1)}× per wall second; ${(recordingS / cpuS).toFixed(1)}× per CPU second of this process (target ≥ 20×)`);
console.log(`  machine load          ${os.loadavg()[0].toFixed(1)} (1-min average on ${os.cpus().length} cores; above the core count, wall figures understate the speed)`);
console.log(`  peak RSS              ${peakRssMb.toFixed(0)} MB (before the run ${(rssBefore / 1024).toFixed(0)} MB; target < 300 MB)`);
console.log(`  result records        ${(resultBytes / 2 ** 20).toFixed(1)} MB (${(run.header.records.bytesPerWindow / 1024).toFixed(1)} kB per window)`);
console.log('  time shares (of the measured stages):');
for (const [name, ms] of shares) console.log(`    ${name.padEnd(40)} ${(ms / 1000).toFixed(2).padStart(7)} s  ${((100 * ms) / accounted).toFixed(1).padStart(5)} %`);
console.log(`    ${'unaccounted (loop, summaries, GC)'.padEnd(40)} ${((run.wallMs - accounted - t.trainingMs) / 1000).toFixed(2).padStart(7)} s`);

if (values.csv) {
  for (const [name, make] of [['sinr.csv', createSinrCsvStream], ['weights.csv', createWeightsCsvStream]] as const) {
    let bytes = 0;
    const sink = new Writable({
      write(chunk: Buffer, _enc, cb) {
        bytes += chunk.length;
        cb();
      },
    });
    const s0 = performance.now();
    await pipeline(await make(resultsDir), sink);
    const s = (performance.now() - s0) / 1000;
    console.log(`  ${name} export         ${(bytes / 2 ** 20).toFixed(0)} MB in ${s.toFixed(1)} s (${(bytes / 2 ** 20 / s).toFixed(0)} MB/s)`);
  }
  console.log(`  peak RSS after export ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
}
