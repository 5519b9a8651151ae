/**
 * run.json: the small JSON header beside windows.f32. It says everything a reader needs to
 * interpret the records without the database: the parameters, the recording's shape, the
 * processed bins and beams, the record layout, the conventions version and the caution.
 * Written once when a job starts; windows done = size of windows.f32 / bytesPerWindow.
 */
import fs from 'node:fs/promises';
import path from 'node:path';
import { CONVENTIONS_VERSION } from '../../shared/conventions.js';
import type { KernelKind } from '../dsp/wasm/simd-kernels.js';
import type { BeamformParams } from '../../shared/params/beamform-params.js';
import type { WindowTiming } from '../../shared/params/job-layout.js';
import { RESULTS_CAUTION } from '../../shared/params/result-caution.js';
import type { TrainingPlan } from '../../shared/params/training-plan.js';
import type { LoadingRule, BeamformerKind } from '../dsp/window-engine.types.js';
import type { RecordLayout } from './record-layout.js';

export const HEADER_FILE = 'run.json';
export const RECORDS_FILE = 'windows.f32';
export const RESULT_FORMAT = 'nullsmith-window-records';
export const RESULT_FORMAT_VERSION = 1;

export interface ResultSetup {
  /** N, active elements in element order. */
  channels: number;
  /** Element positions in metres, one [x, y, z] per active element. */
  positionsM: [number, number, number][];
  speedMps: number;
  /** FFT bin indices and their physical frequencies (Hz), ascending by frequency. */
  bins: number[];
  binFreqsHz: number[];
  /** Look directions in beam order (elevation-major). */
  azimuthsDeg: number[];
  elevationsDeg: number[];
  /** Beam indices whose weights are saved. */
  savedBeams: number[];
  beamformer: BeamformerKind;
  loading: LoadingRule;
  snapshotsPerWindow: number;
  /** K for the sliding window; (1+α)/(1−α), capped at K, for exponential forgetting. */
  effectiveSnapshots: number;
  /**
   * How the SINR fields were made: 'evaluation-block' is the bias-corrected estimate against
   * noise-only frames that did not build the weights; 'upper-bound' is the heuristic bound from
   * the smallest eigenvalues, used when the job has no noise-only interval (README "Conventions").
   */
  sinrMethod: 'evaluation-block' | 'upper-bound';
}

export interface ResultHeader {
  format: typeof RESULT_FORMAT;
  formatVersion: number;
  product: 'Nullsmith';
  conventionsVersion: string;
  caution: string;
  params: BeamformParams;
  recording: { sampleRate: number; channels: number; complex: boolean; centerFrequencyHz: number; totalFrames: number };
  timing: WindowTiming;
  training: TrainingPlan;
  setup: ResultSetup;
  records: RecordLayout & { file: string };
  /**
   * Which numeric kernels computed the records (worker/dsp/wasm/simd-kernels.ts). Not part of
   * the resume check: a job resumed where the other kind is in use continues, and its later
   * windows agree with an uninterrupted run to rounding (≈ 1e-12 relative) instead of bit for bit.
   */
  engine: { kernels: KernelKind };
  /** Free-form facts the caller adds (input checksums, software version, job id). */
  meta: Record<string, unknown>;
}

export function buildHeader(h: Omit<ResultHeader, 'format' | 'formatVersion' | 'product' | 'conventionsVersion' | 'caution'>): ResultHeader {
  return { format: RESULT_FORMAT, formatVersion: RESULT_FORMAT_VERSION, product: 'Nullsmith', conventionsVersion: CONVENTIONS_VERSION, caution: RESULTS_CAUTION, ...h };
}

export async function writeHeader(dir: string, header: ResultHeader): Promise<void> {
  await fs.mkdir(dir, { recursive: true });
  const file = path.join(dir, HEADER_FILE);
  const tmp = `${file}.tmp`;
  // Write-then-rename so a crash never leaves half a header.
  const fh = await fs.open(tmp, 'w');
  try {
    await fh.writeFile(`${JSON.stringify(header, null, 2)}\n`);
    await fh.sync();
  } finally {
    await fh.close();
  }
  await fs.rename(tmp, file);
}

export class ResultFilesError extends Error {
  override readonly name = 'ResultFilesError';
}

export async function readHeader(dir: string): Promise<ResultHeader> {
  const file = path.join(dir, HEADER_FILE);
  let text: string;
  try {
    text = await fs.readFile(file, 'utf8');
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') throw new ResultFilesError(`no result header at ${file}: this directory holds no Nullsmith results (or the job has not started)`);
    throw e;
  }
  let header: ResultHeader;
  try {
    header = JSON.parse(text) as ResultHeader;
  } catch {
    throw new ResultFilesError(`${file} is not valid JSON; the result header is damaged — re-run the job`);
  }
  if (header.format !== RESULT_FORMAT) throw new ResultFilesError(`${file} is not a Nullsmith result header (format "${String(header.format)}")`);
  if (header.formatVersion !== RESULT_FORMAT_VERSION) {
    throw new ResultFilesError(`${file} uses result format version ${header.formatVersion}; this Nullsmith reads version ${RESULT_FORMAT_VERSION}`);
  }
  return header;
}

/**
 * The parts of two headers that must agree for a resumed job to continue the same records.
 * `meta` may differ (a resumed run may carry a new attempt number).
 */
export function sameResultShape(a: ResultHeader, b: ResultHeader): boolean {
  const shape = (h: ResultHeader) => JSON.stringify([h.params, h.recording, h.timing, h.training, h.setup, h.records, h.conventionsVersion]);
  return shape(a) === shape(b);
}
