/**
 * Reads a training span (TrainingPlan block) and transforms its frames into a snapshot block
 * of `frames` snapshots per bin. Runs once per job, before the first window.
 */
import type { FrameBlockPlan } from '../../shared/params/training-plan.js';
import type { FrameSource } from '../io/frame-source.js';
import type { SnapshotBlock } from '../dsp/window-engine.types.js';
import type { FrameTransformer } from './frame-transformer.js';
import { SampleCursor } from './sample-cursor.js';

/** Samples read per block while training (bounded, independent of the span's length). */
const TRAINING_READ_SAMPLES = 1 << 16;

export async function buildTrainingBlock(
  plan: FrameBlockPlan,
  source: FrameSource,
  transformer: FrameTransformer,
  bins: number,
  hop: number,
  signal?: AbortSignal,
): Promise<{ block: SnapshotBlock; readMs: number }> {
  const n = source.channels;
  const block = new Float64Array(bins * plan.frames * n * 2);
  const nfft = transformer.nfft;
  const cursor = new SampleCursor(source, TRAINING_READ_SAMPLES + nfft);
  // Frames per read: as many as fit in the cursor with their overlap.
  const framesPerRead = Math.max(1, Math.floor((TRAINING_READ_SAMPLES - nfft) / hop) + 1);
  for (let m0 = 0; m0 < plan.frames; m0 += framesPerRead) {
    signal?.throwIfAborted();
    const m1 = Math.min(plan.frames, m0 + framesPerRead);
    await cursor.ensure(plan.firstSample + m0 * hop, plan.firstSample + (m1 - 1) * hop + nfft);
    for (let m = m0; m < m1; m++) transformer.transform(cursor, plan.firstSample + m * hop, block, m, plan.frames);
  }
  return { block, readMs: cursor.readMs };
}
