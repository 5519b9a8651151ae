/** Wall time per stage of a job, for the benchmark's shares and the job log. */
export interface StageTimes {
  /** Reading and decoding samples (FrameSource.read). */
  readMs: number;
  /** Windowing, FFT and scattering bins into snapshots. */
  fftMs: number;
  /** Ordering and weighting snapshots into the window's block. */
  assembleMs: number;
  /** Covariance estimation per bin (from the engine when it reports it, else included in solveMs). */
  covarianceMs: number;
  /** Loading, factorisation, weights and diagnostics (the rest of engine.processWindow). */
  solveMs: number;
  /** Packing and writing records, fsync. */
  outputMs: number;
  /** Building the training blocks and setTraining. */
  trainingMs: number;
}

export function emptyStageTimes(): StageTimes {
  return { readMs: 0, fftMs: 0, assembleMs: 0, covarianceMs: 0, solveMs: 0, outputMs: 0, trainingMs: 0 };
}
