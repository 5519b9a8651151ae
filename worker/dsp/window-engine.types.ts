/**
 * Contract between the numeric core (worker/dsp, pure) and the job runner (worker/runner,
 * the I/O edge). The runner reads samples, runs the STFT, gathers snapshots per bin and asks
 * the engine for one processing window at a time; the engine returns everything the result
 * files and CSVs need. All buffers are caller-owned typed arrays sized once per job, so the
 * per-window path allocates nothing.
 *
 * Conventions: ../../README.md "Conventions" and CONVENTIONS_VERSION in shared/conventions.ts.
 */

/** Diagonal loading rule. Levels in dB; see CONVENTIONS.md "Windows and estimates". */
export type LoadingRule =
  | { kind: 'none' }
  /** δ = 10^(L/10)·tr(R)/N */
  | { kind: 'trace'; levelDb: number }
  /** δ = 10^(L/10)·λ_med (median eigenvalue; mean of the two middle ones for even N) */
  | { kind: 'noise-floor'; levelDb: number }
  /** Ledoit–Wolf (2004) shrinkage adapted to complex data; δ = sμ/(1−s). */
  | { kind: 'ledoit-wolf' }
  /** Smallest δ whose weights keep white-noise gain ≥ minWngDb (Cox, Zeskind & Owen 1987). */
  | { kind: 'wng-floor'; minWngDb: number };

export type BeamformerKind = 'mvdr' | 'mpdr' | 'conventional';

export interface EngineSetup {
  /** N: active elements, in element order. */
  channels: number;
  /** Element positions in metres, [x0,y0,z0,x1,y1,z1,…], length 3N, array frame of CONVENTIONS.md. */
  positionsM: Float64Array;
  /** Propagation speed in m/s. */
  speedMps: number;
  /** Physical frequency (Hz) of each processed bin, length nBins (for complex baseband: fc + offset). */
  binFreqsHz: Float64Array;
  /** Look directions in degrees, equal lengths (nBeams). */
  azimuthsDeg: Float64Array;
  elevationsDeg: Float64Array;
  /** Indices into the beam fan whose weights are saved (nSaved). */
  savedBeams: Int32Array;
  beamformer: BeamformerKind;
  loading: LoadingRule;
  /** K: snapshots per processing window. */
  snapshotsPerWindow: number;
}

/**
 * Snapshot block layout used everywhere: Float64Array of length nBins·K·N·2,
 * index ((bin·K + k)·N + n)·2 + (0 re | 1 im).
 */
export type SnapshotBlock = Float64Array;

/**
 * Everything one processing window produces. Arrays are sized by `allocateWindowResult` and
 * overwritten by each call to `processWindow`. Values that do not exist for a window (e.g. SINR
 * without a noise-only interval) are NaN. Powers are linear (the writer converts to dB).
 */
export interface WindowResult {
  /** δ applied per bin (linear, same units as R). */
  loading: Float64Array; // [nBins]
  /** 1 when R (+ loading) was not positive definite for that bin: its outputs are NaN. */
  notPositiveDefinite: Uint8Array; // [nBins]
  /** Adaptive (Capon / MVDR / MPDR) output power wᴴ·R̂x·w per bin and beam. */
  adaptivePower: Float64Array; // [nBins·nBeams]
  /** Conventional (w = v/N) output power per bin and beam: vᴴ·R̂x·v/N². */
  conventionalPower: Float64Array; // [nBins·nBeams]
  /** White-noise gain |wᴴv|²/(wᴴw), linear, per bin and beam. */
  wng: Float64Array; // [nBins·nBeams]
  /** SINR estimate, linear, per bin and beam; NaN where it cannot be estimated. */
  sinr: Float64Array; // [nBins·nBeams]
  /** Lower and upper confidence bounds of sinr (NaN when not available). */
  sinrLow: Float64Array; // [nBins·nBeams]
  sinrHigh: Float64Array; // [nBins·nBeams]
  /** Broadband (incoherent sum over the band) per beam. */
  broadbandAdaptivePower: Float64Array; // [nBeams]
  broadbandConventionalPower: Float64Array; // [nBeams]
  broadbandSinr: Float64Array; // [nBeams]
  /** Weights of the saved beams: ((bin·nSaved + s)·N + n)·2 + (re|im). */
  weights: Float64Array; // [nBins·nSaved·N·2]
  /** Sorted eigenvalues of R̂ (descending) per bin. */
  eigenvalues: Float64Array; // [nBins·N]
  /** Noise-floor estimate σ̂w² per bin, the Marchenko–Pastur upper edge, and eigenvalues above it. */
  noiseFloor: Float64Array; // [nBins]
  mpUpperEdge: Float64Array; // [nBins]
  eigenvaluesAboveEdge: Int32Array; // [nBins]
  conditionNumber: Float64Array; // [nBins]
}

/**
 * The pure engine. Implemented in worker/dsp (one object per job, built once per problem size;
 * tables such as steering vectors precomputed in the constructor).
 */
export interface WindowEngine {
  readonly setup: EngineSetup;
  /**
   * MVDR: train on signal-absent snapshots. `weightsBlock` (K_a snapshots per bin) builds R̂n and
   * the weights; `evaluationBlock` (K_e other noise-only snapshots per bin) gives P̂n for the
   * bias-corrected SINR estimate (DOMAIN.md §2). For MPDR the evaluation block alone may be given
   * to enable the same SINR estimator.
   */
  setTraining(weightsBlock: SnapshotBlock | null, weightsSnapshots: number, evaluationBlock: SnapshotBlock | null, evaluationSnapshots: number): void;
  /** Processes one window of K snapshots per bin and writes every output into `out`. */
  processWindow(snapshots: SnapshotBlock, out: WindowResult): void;
}
