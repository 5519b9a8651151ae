/**
 * The job runner: the I/O edge that drives the pure window engine over a recording.
 *
 * For each processing window j (frames [j·whop, j·whop + K), CONVENTIONS.md) it reads only the
 * samples of frames not yet transformed, runs the STFT per channel and frame into a ring of the
 * last K frames' snapshots (overlapping windows never recompute an FFT), hands the window's
 * block to engine.processWindow and appends the result to windows.f32. MVDR training blocks
 * come from the training span first (training-plan.ts: first half builds the weights, second
 * half evaluates P̂n). Every buffer is allocated before the first window; the per-window path
 * allocates only what the I/O calls need (and the optional progress summary).
 *
 * Durability: records are fsynced before `onCheckpoint(lastWindow)` is called (at most every
 * checkpointIntervalMs, and when the job ends or stops); the queue must commit only those
 * checkpoints. Resuming from window r truncates windows.f32 to r records first, and because
 * every window depends only on its own frames (and the fixed training), a resumed job writes
 * the same bytes as an uninterrupted one.
 */
import type { ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import { formatParamsProblem, type BeamformParams } from '../../shared/params/beamform-params.js';
import { effectiveSnapshots, windowSpanS, windowTiming } from '../../shared/params/job-layout.js';
import { trainingPlan } from '../../shared/params/training-plan.js';
import { validateParamsAgainstRecording } from '../../shared/params/validate-against-recording.js';
import type { FrameSource } from '../io/frame-source.js';
import { allocateWindowResult, createWindowEngine } from '../dsp/window-engine.js';
import type { WindowResult } from '../dsp/window-engine.types.js';
import { recordLayout } from '../results/record-layout.js';
import { kernelKind } from '../dsp/wasm/simd-kernels.js';
import { buildHeader, readHeader, sameResultShape, writeHeader, ResultFilesError, type ResultHeader } from '../results/result-header.js';
import { ResultWriter, truncateToCheckpoint } from '../results/result-writer.js';
import { buildEngineSetup } from './engine-setup.js';
import { FrameTransformer } from './frame-transformer.js';
import { SampleCursor } from './sample-cursor.js';
import { SnapshotRing } from './snapshot-ring.js';
import { emptyStageTimes, type StageTimes } from './stage-timer.js';
import { buildTrainingBlock } from './training-blocks.js';
import { summarizeWindow, type WindowDoneSummary } from './window-done-summary.js';

export interface RunBeamformJobOptions {
  /** The recording, samples already routed to the array's active elements (openFrameSource with the array's options). */
  source: FrameSource;
  /** The separate noise-only recording when MVDR trains on one (same routing). */
  trainingSource?: FrameSource;
  params: BeamformParams;
  array: ArrayGeometry;
  /** Directory of the job's result files (run.json, windows.f32). */
  outDir: string;
  /** First window to compute; windows before it must be stored and checkpointed. Default 0. */
  resumeFromWindow?: number;
  /** Aborting stops the job after the window in progress (records flushed, checkpoint reported). */
  signal?: AbortSignal;
  /** Called after every window with light per-window facts for live views. */
  onWindowDone?: (window: number, totalWindows: number, summary: WindowDoneSummary) => void;
  /** Called with the last window whose record is on disk (fsynced); commit only these. */
  onCheckpoint?: (lastWindow: number) => void | Promise<void>;
  /** Minimum time between checkpoints (ms). Default 1000. */
  checkpointIntervalMs?: number;
  /** Extra facts stored in run.json `meta` (input checksums, software version, job id). */
  meta?: Record<string, unknown>;
}

export interface RunBeamformJobResult {
  status: 'completed' | 'aborted';
  totalWindows: number;
  /** Windows stored and fsynced (the last checkpoint is windowsDone − 1). */
  windowsDone: number;
  /** Windows computed by this call (excludes those resumed past). */
  windowsComputed: number;
  /** Seconds of recording covered by the windows this call computed (new frames only). */
  recordingSecondsProcessed: number;
  wallMs: number;
  times: StageTimes;
  header: ResultHeader;
}

/** Thrown before any work when parameters cannot run on this recording; `problems` name fields. */
export class JobSetupError extends Error {
  override readonly name = 'JobSetupError';
  constructor(readonly problems: { path: (string | number)[]; message: string }[]) {
    super(`the job cannot run: ${problems.map(formatParamsProblem).join('; ')}`);
  }
}

function shapeOf(s: FrameSource) {
  return { sampleRate: s.sampleRate, totalFrames: s.totalFrames, complex: s.complex, centerFrequencyHz: s.centerFrequencyHz };
}

export async function runBeamformJob(opts: RunBeamformJobOptions): Promise<RunBeamformJobResult> {
  const started = performance.now();
  const { source, params, array, outDir, signal } = opts;
  const resumeFrom = opts.resumeFromWindow ?? 0;
  const times = emptyStageTimes();

  // --- Setup checks (nothing stored is touched before they pass) ---
  const rec = shapeOf(source);
  const trainingRec = opts.trainingSource ? shapeOf(opts.trainingSource) : undefined;
  const problems = validateParamsAgainstRecording(params, { ...rec, channels: null }, array, trainingRec && { ...trainingRec, channels: null });
  const { setup, bins } = buildEngineSetup(params, array, rec);
  if (source.channels !== setup.channels) {
    problems.push({ path: ['array', 'elements'], message: `the recording delivers ${source.channels} channels but the array has ${setup.channels} active elements; open the recording with the array's channel map` });
  }
  if (opts.trainingSource && opts.trainingSource.channels !== setup.channels) {
    problems.push({ path: ['beamformer', 'training'], message: `the training recording delivers ${opts.trainingSource.channels} channels but the array has ${setup.channels} active elements` });
  }
  if (params.beamformer.kind === 'mvdr' && params.beamformer.training.source === 'recording' && !opts.trainingSource) {
    problems.push({ path: ['beamformer', 'training', 'recordingRef'], message: 'MVDR trains on a separate recording, but none was opened for this job' });
  }
  if (problems.length) throw new JobSetupError(problems);

  const timing = windowTiming(params, rec);
  const plan = trainingPlan(params, rec, trainingRec);
  const nBins = bins.length;
  const n = setup.channels;
  const K = params.snapshotsPerWindow;
  const layout = recordLayout({ bins: nBins, beams: setup.azimuthsDeg.length, saved: setup.savedBeams.length, channels: n });
  const header = buildHeader({
    params,
    recording: { ...rec, channels: n },
    timing,
    training: plan,
    setup: {
      channels: n,
      positionsM: Array.from({ length: n }, (_, i) => [setup.positionsM[3 * i], setup.positionsM[3 * i + 1], setup.positionsM[3 * i + 2]] as [number, number, number]),
      speedMps: setup.speedMps,
      bins: Array.from(bins),
      binFreqsHz: Array.from(setup.binFreqsHz),
      azimuthsDeg: Array.from(setup.azimuthsDeg),
      elevationsDeg: Array.from(setup.elevationsDeg),
      savedBeams: Array.from(setup.savedBeams),
      beamformer: setup.beamformer,
      loading: setup.loading,
      snapshotsPerWindow: K,
      effectiveSnapshots: effectiveSnapshots(params),
      // Mirrors the engine's choice in setTraining: an evaluation block exists only for adaptive
      // beamformers whose plan has noise-only evaluation frames.
      sinrMethod: params.beamformer.kind !== 'conventional' && (plan.evaluation?.frames ?? 0) > 0 ? 'evaluation-block' : 'upper-bound',
    },
    records: { ...layout, file: 'windows.f32' },
    engine: { kernels: kernelKind() },
    meta: opts.meta ?? {},
  });

  if (!Number.isInteger(resumeFrom) || resumeFrom < 0 || resumeFrom > timing.windows) {
    throw new RangeError(`resumeFromWindow must be a whole number from 0 to ${timing.windows}, got ${resumeFrom}`);
  }
  if (resumeFrom > 0) {
    const stored = await readHeader(outDir);
    if (!sameResultShape(stored, header)) {
      throw new ResultFilesError(`cannot resume: the results in ${outDir} were made with other parameters, another recording shape or another conventions version; start the job from window 0`);
    }
    await truncateToCheckpoint(outDir, resumeFrom - 1);
  }
  await writeHeader(outDir, header);

  // --- Engine and training ---
  const engine = createWindowEngine(setup);
  const result: WindowResult = allocateWindowResult(setup);
  const transformer = new FrameTransformer(params.nfft, params.window, bins, n, source.complex);
  if (params.beamformer.kind !== 'conventional' && (plan.weights || plan.evaluation)) {
    const t0 = performance.now();
    const fft0 = transformer.fftMs;
    const blockFor = async (p: typeof plan.weights) => {
      if (!p || p.frames === 0) return null;
      const src = p.source === 'training-recording' ? opts.trainingSource! : source;
      return (await buildTrainingBlock(p, src, transformer, nBins, params.hop, signal)).block;
    };
    const weightsBlock = await blockFor(plan.weights);
    const evaluationBlock = await blockFor(plan.evaluation);
    engine.setTraining(weightsBlock, plan.weights?.frames ?? 0, evaluationBlock, plan.evaluation?.frames ?? 0);
    times.trainingMs = performance.now() - t0;
    // Training work is reported on its own line, not in the per-window shares.
    transformer.fftMs = fft0;
  }

  // --- Windows ---
  const whop = params.windowHop;
  const hop = params.hop;
  const s0 = timing.firstSample;
  const newFramesPerWindow = Math.min(whop, K);
  // Room for one window's new frames plus read-ahead (~64k samples per channel).
  const cursor = new SampleCursor(source, (newFramesPerWindow - 1) * hop + params.nfft + (1 << 16));
  const framesPerRead = Math.floor((cursor.capacity - params.nfft) / hop) + 1;
  const ring = new SnapshotRing(nBins, K, n, params.estimator.kind === 'exponential' ? params.estimator.alpha : null);
  const writer = await ResultWriter.open(outDir, layout, resumeFrom);
  const interval = opts.checkpointIntervalMs ?? 1000;
  let lastCheckpointAt = performance.now();
  let durable = resumeFrom - 1;
  let nextFrame = resumeFrom * whop; // first frame not yet in the ring
  let framesProcessed = 0;
  let status: RunBeamformJobResult['status'] = 'completed';

  const checkpoint = async () => {
    if (writer.lastWritten === durable) return;
    const t0 = performance.now();
    await writer.flush();
    times.outputMs += performance.now() - t0;
    durable = writer.lastWritten;
    lastCheckpointAt = performance.now();
    await opts.onCheckpoint?.(durable);
  };

  try {
    for (let j = resumeFrom; j < timing.windows; j++) {
      if (signal?.aborted) {
        status = 'aborted';
        break;
      }
      const first = j * whop;
      const end = first + K;
      const from = Math.max(nextFrame, first);
      // Transform the frames this window adds; the cursor reads ahead to its capacity.
      for (let m0 = from; m0 < end; ) {
        const m1 = Math.min(end, m0 + framesPerRead);
        await cursor.ensure(s0 + m0 * hop, s0 + (m1 - 1) * hop + params.nfft);
        for (let m = m0; m < m1; m++) transformer.transform(cursor, s0 + m * hop, ring.storage, ring.slotOf(m), K);
        m0 = m1;
      }
      framesProcessed += Math.max(0, end - from);
      nextFrame = end;

      let t = performance.now();
      const block = ring.windowBlock(first);
      times.assembleMs += performance.now() - t;
      t = performance.now();
      engine.processWindow(block, result);
      times.solveMs += performance.now() - t;
      t = performance.now();
      await writer.append(j, result);
      times.outputMs += performance.now() - t;

      if (opts.onWindowDone) opts.onWindowDone(j, timing.windows, summarizeWindow(j, windowSpanS(j, timing), setup, result));
      if (performance.now() - lastCheckpointAt >= interval) await checkpoint();
    }
    await checkpoint();
  } finally {
    await writer.close();
  }

  times.readMs = cursor.readMs;
  times.fftMs = transformer.fftMs;
  const engineTimes = (engine as { stageTimes?: { covarianceMs: number } }).stageTimes;
  if (engineTimes) {
    times.covarianceMs = engineTimes.covarianceMs;
    times.solveMs -= engineTimes.covarianceMs;
  }
  return {
    status,
    totalWindows: timing.windows,
    windowsDone: durable + 1,
    windowsComputed: durable + 1 - resumeFrom,
    recordingSecondsProcessed: (framesProcessed * hop) / rec.sampleRate,
    wallMs: performance.now() - started,
    times,
    header,
  };
}
