import type { BeamformParams, TimeRange } from './beamform-params.js';
import { frameCount, rangeToSamples, type RecordingShape } from './job-layout.js';

/**
 * Which frames train the beamformer (DOMAIN.md §2, "SINR estimate, noise-only and
 * signal-present intervals").
 *
 * MVDR: the noise-only training span is cut into two halves. The first half's frames build R̂n
 * and the weights; the second half's frames evaluate P̂n = wᴴ·R̂n⁽ᴮ⁾·w for the bias-corrected
 * SINR estimate, because measuring P̂n on the frames that built w overstates SINR badly.
 * Between the halves, ⌈nfft/hop⌉ − 1 frames are skipped so that no sample (and no overlapping
 * analysis window) is shared by both halves.
 *
 * MPDR: the weights come from each window's own data; an optional noise-only span gives the
 * evaluation block (all of its frames). Conventional beams train nothing.
 */
export interface FrameBlockPlan {
  /** Which recording: this one, or the separate training recording. */
  source: 'recording' | 'training-recording';
  /** First sample of frame 0 of the block. */
  firstSample: number;
  /** Frames (snapshots per bin) in the block. */
  frames: number;
}

export interface TrainingPlan {
  weights: FrameBlockPlan | null;
  evaluation: FrameBlockPlan | null;
}

/** Frames skipped between the two halves so they share no samples. */
export function trainingGapFrames(nfft: number, hop: number): number {
  return Math.ceil(nfft / hop) - 1;
}

function split(source: FrameBlockPlan['source'], range: TimeRange | undefined, rec: Pick<RecordingShape, 'sampleRate' | 'totalFrames'>, nfft: number, hop: number): TrainingPlan {
  const { start, end } = rangeToSamples(range, rec);
  const total = frameCount(end - start, nfft, hop);
  const gap = trainingGapFrames(nfft, hop);
  const usable = Math.max(0, total - gap);
  const weightsFrames = Math.floor(usable / 2);
  const evaluationFrames = usable - weightsFrames;
  return {
    weights: { source, firstSample: start, frames: weightsFrames },
    evaluation: { source, firstSample: start + (weightsFrames + gap) * hop, frames: evaluationFrames },
  };
}

/**
 * The training blocks for a job. `trainingRec` describes the separate noise-only recording when
 * MVDR trains on one (required then). Frame counts may be 0 when a span is too short;
 * validateParamsAgainstRecording reports that before a job runs.
 */
export function trainingPlan(
  params: Pick<BeamformParams, 'beamformer' | 'nfft' | 'hop'>,
  rec: Pick<RecordingShape, 'sampleRate' | 'totalFrames'>,
  trainingRec?: Pick<RecordingShape, 'sampleRate' | 'totalFrames'>,
): TrainingPlan {
  const bf = params.beamformer;
  if (bf.kind === 'conventional') return { weights: null, evaluation: null };
  if (bf.kind === 'mpdr') {
    if (!bf.noiseRange) return { weights: null, evaluation: null };
    const { start, end } = rangeToSamples(bf.noiseRange, rec);
    return { weights: null, evaluation: { source: 'recording', firstSample: start, frames: frameCount(end - start, params.nfft, params.hop) } };
  }
  if (bf.training.source === 'range') return split('recording', bf.training, rec, params.nfft, params.hop);
  if (!trainingRec) throw new Error('MVDR trains on a separate recording here: describe that recording (trainingRec) to plan its frames.');
  return split('training-recording', bf.training.range, trainingRec, params.nfft, params.hop);
}
