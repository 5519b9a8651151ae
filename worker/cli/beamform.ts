/**
 * npm run beamform -- <recording> --array <array.json> --params <params.json> --out <dir>
 *   [--sidecar <file>] [--training <recording>] [--resume] [--plain-csv]
 *
 * Runs one beamforming job on this machine, without a server: the same runner and CSV writers
 * as the service. Writes run.json (every parameter, conventions version, input SHA-256s,
 * software version, caution), windows.f32, weights.csv and sinr.csv into --out. Progress goes
 * to stderr; Ctrl-C stops after the current window and --resume continues later.
 * Exit codes: 0 done, 1 bad input or failure, 2 bad command line, 130 interrupted.
 */
import fs from 'node:fs/promises';
import { createWriteStream } from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { arrayGeometrySchema, type ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { formatParamsProblem, parseBeamformParams, type BeamformParams } from '../../shared/params/beamform-params.js';
import { windowTiming } from '../../shared/params/job-layout.js';
import { RESULTS_CAUTION } from '../../shared/params/result-caution.js';
import { validateParamsAgainstRecording } from '../../shared/params/validate-against-recording.js';
import { frameSourceOptionsFromArray, openFrameSource } from '../io/index.js';
import type { FrameSource } from '../io/frame-source.js';
import { createSinrCsvStream, createWeightsCsvStream, WEIGHTS_CSV_COLUMNS } from '../results/csv-streams.js';
import { HEADER_FILE, RECORDS_FILE, ResultFilesError, readHeader } from '../results/result-header.js';
import { runBeamformJob, JobSetupError } from '../runner/run-beamform-job.js';
import { sha256File } from './file-checksum.js';
import { locateRecording, type LocatedRecording } from './locate-recording.js';
import { clock, ProgressLine } from './progress-line.js';

const USAGE = `Usage: npm run beamform -- <recording> --array <array.json> --params <params.json> --out <dir>
       [--sidecar <side file>] [--training <noise-only recording>] [--resume] [--plain-csv]

  <recording>   WAV, RF64/BW64, SigMF (.sigmf-meta or .sigmf-data) or raw data with a JSON side file
  --array       array description (element positions in metres, channel map, speed of sound)
  --params      job parameters (schemaVersion 1: nfft, hop, band, K, window hop, loading, beamformer, beams)
  --out         directory for run.json, windows.f32, weights.csv and sinr.csv
  --sidecar     side file for a raw recording (default: <recording>.json)
  --training    separate noise-only recording when params.beamformer.training.source is "recording"
  --resume      continue an interrupted run in --out from its last whole window
  --plain-csv   leave out the "# " comment lines at the top of the CSVs (run.json keeps them)`;

class CliInputError extends Error {}

function usageError(message: string): never {
  process.stderr.write(`beamform: ${message}\n\n${USAGE}\n`);
  process.exit(2);
}

async function readJson(file: string, what: string): Promise<unknown> {
  let text: string;
  try {
    text = await fs.readFile(file, 'utf8');
  } catch (e) {
    throw new CliInputError(`cannot read the ${what} file ${file}: ${(e as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (e as Error).message}`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new CliInputError(`the ${what} file ${file} is not valid JSON (${(e as Error).message}); fix it and try again`);
  }
}

async function loadArray(file: string): Promise<ArrayGeometry> {
  const r = arrayGeometrySchema.safeParse(await readJson(file, 'array'));
  if (!r.success) throw new CliInputError(`the array file ${file} is not valid:\n${r.error.issues.map((i) => `  ${i.path.join('.') || '(top level)'}: ${i.message}`).join('\n')}`);
  return r.data;
}

async function loadParams(file: string): Promise<BeamformParams> {
  const r = parseBeamformParams(await readJson(file, 'parameters'));
  if (!r.ok) throw new CliInputError(`the parameters file ${file} is not valid:\n${r.problems.map((p) => `  ${formatParamsProblem(p)}`).join('\n')}`);
  return r.params;
}

function softwareVersion(): Promise<string> {
  const pkg = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../package.json');
  return fs.readFile(pkg, 'utf8').then((t) => (JSON.parse(t) as { version: string }).version);
}

async function checksums(files: { role: string; path: string }[], progress: ProgressLine) {
  let total = 0;
  for (const f of files) total += (await fs.stat(f.path)).size;
  let done = 0;
  const out: Record<string, { path: string; bytes: number; sha256: string }> = {};
  for (const f of files) {
    const sha256 = await sha256File(f.path, (n) => {
      done += n;
      progress.update(() => `checksums: ${((100 * done) / Math.max(1, total)).toFixed(0)} % of ${(total / 2 ** 20).toFixed(1)} MB`);
    });
    out[f.role] = { path: path.resolve(f.path), bytes: (await fs.stat(f.path)).size, sha256 };
  }
  return out;
}

async function writeCsv(file: string, make: () => Promise<NodeJS.ReadableStream>, progress: ProgressLine): Promise<void> {
  const tmp = `${file}.partial`;
  const stream = await make();
  const sink = createWriteStream(tmp);
  let bytes = 0;
  stream.on('data', (c: Buffer) => {
    bytes += c.length;
    progress.update(() => `writing ${path.basename(file)}: ${(bytes / 2 ** 20).toFixed(1)} MB`);
  });
  await pipeline(stream, sink);
  await fs.rename(tmp, file);
}

async function main(): Promise<number> {
  let args;
  try {
    args = parseArgs({
      allowPositionals: true,
      options: {
        array: { type: 'string' },
        params: { type: 'string' },
        out: { type: 'string' },
        sidecar: { type: 'string' },
        training: { type: 'string' },
        resume: { type: 'boolean', default: false },
        'plain-csv': { type: 'boolean', default: false },
        help: { type: 'boolean', short: 'h', default: false },
      },
    });
  } catch (e) {
    usageError((e as Error).message);
  }
  const o = args.values;
  if (o.help) {
    process.stdout.write(`${USAGE}\n`);
    return 0;
  }
  if (args.positionals.length !== 1) usageError(args.positionals.length === 0 ? 'give the recording to process' : `give one recording, not ${args.positionals.length}`);
  if (!o.array) usageError('--array <array.json> is required');
  if (!o.params) usageError('--params <params.json> is required');
  if (!o.out) usageError('--out <dir> is required');
  const recordingPath = args.positionals[0];
  const outDir = o.out;

  const array = await loadArray(o.array);
  const params = await loadParams(o.params);
  const rec = await locateRecording(recordingPath, o.sidecar);
  const needsTraining = params.beamformer.kind === 'mvdr' && params.beamformer.training.source === 'recording';
  if (needsTraining && !o.training) throw new CliInputError(`params.beamformer.training names a separate recording ("${(params.beamformer as { training: { recordingRef: string } }).training.recordingRef}"); pass it with --training <file>`);
  if (!needsTraining && o.training) throw new CliInputError('--training was given, but the parameters do not train MVDR on a separate recording (beamformer.training.source "recording")');
  const training: LocatedRecording | undefined = o.training ? await locateRecording(o.training) : undefined;

  const info = (r: LocatedRecording) => ({ sampleRate: r.description.sampleRate, totalFrames: r.description.frames, complex: r.description.complex, centerFrequencyHz: r.description.centerFrequencyHz, channels: r.description.channels });
  const problems = validateParamsAgainstRecording(params, info(rec), array, training && info(training));
  if (problems.length) throw new CliInputError(`these parameters cannot run on ${path.basename(recordingPath)}:\n${problems.map((p) => `  ${formatParamsProblem(p)}`).join('\n')}`);
  for (const w of rec.description.warnings) process.stderr.write(`note: ${w}\n`);

  // Where to start: a fresh run, or the last whole window of an interrupted one.
  let resumeFrom = 0;
  if (o.resume) {
    const header = await readHeader(outDir).catch((e: unknown) => {
      if (e instanceof ResultFilesError) throw new CliInputError(`--resume: ${e.message}`);
      throw e;
    });
    const size = (await fs.stat(path.join(outDir, RECORDS_FILE)).catch(() => ({ size: 0 }))).size;
    resumeFrom = Math.min(header.timing.windows, Math.floor(size / header.records.bytesPerWindow));
    process.stderr.write(`resuming at window ${resumeFrom} of ${header.timing.windows}\n`);
  }

  let progress = new ProgressLine();
  const inputs = await checksums(
    [
      { role: 'recording', path: rec.dataPath },
      ...(rec.sidecarPath ? [{ role: 'recordingSidecar', path: rec.sidecarPath }] : []),
      ...(training ? [{ role: 'trainingRecording', path: training.dataPath }] : []),
      ...(training?.sidecarPath ? [{ role: 'trainingSidecar', path: training.sidecarPath }] : []),
      { role: 'array', path: o.array },
      { role: 'params', path: o.params },
    ],
    progress,
  );

  const ac = new AbortController();
  const onSigint = () => {
    process.stderr.write('\nstopping after the current window…\n');
    ac.abort();
  };
  process.once('SIGINT', onSigint);

  // A fresh line per phase, so each phase shows its first progress at once.
  progress = new ProgressLine();
  const options = frameSourceOptionsFromArray(array);
  const source: FrameSource = await openFrameSource(rec.dataPath, rec.description, options);
  const trainingSource = training ? await openFrameSource(training.dataPath, training.description, options) : undefined;
  const timing = windowTiming(params, { sampleRate: source.sampleRate, totalFrames: source.totalFrames });
  const secondsPerWindow = (params.windowHop * params.hop) / source.sampleRate;
  let result;
  const runStart = performance.now();
  try {
    result = await runBeamformJob({
      source,
      trainingSource,
      params,
      array,
      outDir,
      resumeFromWindow: resumeFrom,
      signal: ac.signal,
      meta: { software: { name: 'Nullsmith', version: await softwareVersion() }, inputs, format: rec.format, startedAt: new Date().toISOString() },
      onWindowDone: (j, total) =>
        progress.update(() => {
          const done = j + 1 - resumeFrom;
          const wall = (performance.now() - runStart) / 1000;
          const rate = done / Math.max(wall, 1e-9);
          return `window ${j + 1}/${total} (${((100 * (j + 1)) / total).toFixed(1)} %), ${rate.toFixed(1)} windows/s, ${((rate * secondsPerWindow) || 0).toFixed(1)}× real time, ETA ${clock((total - j - 1) / rate)}`;
        }),
    });
  } finally {
    process.removeListener('SIGINT', onSigint);
    await source.close();
    await trainingSource?.close();
  }
  if (result.status === 'aborted') {
    progress.done(`stopped after window ${result.windowsDone} of ${result.totalWindows}; continue with --resume`);
    return 130;
  }
  progress.done(`beamformed ${result.totalWindows} windows (${timing.frames} frames) in ${clock(progress.elapsedS())}`);

  const plain = o['plain-csv'];
  progress = new ProgressLine();
  await writeCsv(path.join(outDir, 'weights.csv'), async () => (result.header.setup.savedBeams.length ? createWeightsCsvStream(outDir, { comments: !plain }) : emptyWeights(plain)), progress);
  await writeCsv(path.join(outDir, 'sinr.csv'), () => createSinrCsvStream(outDir, { comments: !plain }), progress);
  progress.done(`wrote ${path.join(outDir, HEADER_FILE)}, weights.csv and sinr.csv`);
  process.stderr.write(`CAUTION: ${RESULTS_CAUTION}\n`);
  return 0;
}

/** No saved beams: weights.csv still exists, with its header line only. */
function emptyWeights(plain: boolean): NodeJS.ReadableStream {
  return Readable.from([`${plain ? '' : '# Nullsmith: no saved beams in this job (params.savedBeams was empty)\n'}${WEIGHTS_CSV_COLUMNS}\n`]);
}

main().then(
  (code) => process.exit(code),
  (e: unknown) => {
    if (e instanceof CliInputError || e instanceof RecordingFormatError || e instanceof ResultFilesError || e instanceof JobSetupError) {
      process.stderr.write(`\nbeamform: ${e.message}\n`);
    } else {
      process.stderr.write(`\nbeamform failed: ${(e as Error).stack ?? String(e)}\n`);
    }
    process.exit(1);
  },
);
