import { azimuthCount, findBeamIndex, type BeamformParams, type TimeRange } from './beamform-params.js';

/**
 * Quantities derived from a job's parameters and its recording: which bins, which beams, how
 * many frames and windows, and where each window lies in time. Pure and shared, so the browser's
 * preview, the queue's progress totals, the runner and the CSV writer all agree.
 *
 * Time conventions (CONVENTIONS.md "Time-frequency", "Windows and estimates"): frame m covers
 * samples [s0 + m·hop, s0 + m·hop + nfft) where s0 is the first sample of the processed range
 * (0 without a timeRange); a partial last frame is dropped. Window j covers frames
 * [j·whop, j·whop + K). Times are always seconds from the first sample of the recording.
 */

/** What the layout needs to know about a recording (FrameSource or parsed header). */
export interface RecordingShape {
  sampleRate: number;
  /** Sample frames (one sample per channel). */
  totalFrames: number;
  complex: boolean;
  /** Centre frequency of complex baseband (Hz); 0 for real recordings. */
  centerFrequencyHz: number;
}

/** Physical frequency of bin k (DOMAIN.md §1 "Which f goes into v"). */
export function binFrequencyHz(k: number, nfft: number, rec: Pick<RecordingShape, 'sampleRate' | 'complex' | 'centerFrequencyHz'>): number {
  if (!rec.complex) return (k * rec.sampleRate) / nfft;
  const signed = k >= nfft / 2 ? k - nfft : k;
  return rec.centerFrequencyHz + (signed * rec.sampleRate) / nfft;
}

/**
 * Bins to process, ascending by physical frequency. A band keeps every bin whose frequency lies
 * in [fLoHz, fHiHz]; for real data DC and Nyquist (k = 0, nfft/2) are never used (the steering
 * model needs 0 < k < nfft/2). Explicit bins are taken as given, sorted by frequency.
 */
export function selectBins(params: Pick<BeamformParams, 'nfft' | 'band' | 'bins'>, rec: Pick<RecordingShape, 'sampleRate' | 'complex' | 'centerFrequencyHz'>): { bins: Int32Array; freqsHz: Float64Array } {
  const { nfft } = params;
  const candidates: number[] = [];
  if (params.bins) {
    candidates.push(...params.bins);
  } else if (params.band) {
    const lo = rec.complex ? 0 : 1;
    const hi = rec.complex ? nfft - 1 : nfft / 2 - 1;
    for (let k = lo; k <= hi; k++) {
      const f = binFrequencyHz(k, nfft, rec);
      if (f >= params.band.fLoHz && f <= params.band.fHiHz) candidates.push(k);
    }
  }
  candidates.sort((a, b) => binFrequencyHz(a, nfft, rec) - binFrequencyHz(b, nfft, rec));
  const bins = Int32Array.from(candidates);
  const freqsHz = Float64Array.from(candidates, (k) => binFrequencyHz(k, nfft, rec));
  return { bins, freqsHz };
}

/** Look directions in beam order (elevation-major: beam = e·nAz + a). */
export function expandBeamFan(fan: BeamformParams['beams']): { azimuthsDeg: Float64Array; elevationsDeg: Float64Array } {
  const nAz = azimuthCount(fan);
  const n = nAz * fan.elevationsDeg.length;
  const azimuthsDeg = new Float64Array(n);
  const elevationsDeg = new Float64Array(n);
  fan.elevationsDeg.forEach((el, e) => {
    for (let a = 0; a < nAz; a++) {
      // from + a·step (not repeated addition) so every client computes the same bits.
      azimuthsDeg[e * nAz + a] = fan.azimuthFromDeg + a * fan.azimuthStepDeg;
      elevationsDeg[e * nAz + a] = el;
    }
  });
  return { azimuthsDeg, elevationsDeg };
}

/** Indices into the fan of the beams whose weights are saved, in the order given. */
export function savedBeamIndices(params: Pick<BeamformParams, 'beams' | 'savedBeams'>): Int32Array {
  return Int32Array.from(params.savedBeams, (b) => findBeamIndex(params.beams, b));
}

/** First and one-past-last sample of a time range, clipped to the recording. */
export function rangeToSamples(range: TimeRange | undefined, rec: Pick<RecordingShape, 'sampleRate' | 'totalFrames'>): { start: number; end: number } {
  if (!range) return { start: 0, end: rec.totalFrames };
  const start = Math.min(rec.totalFrames, Math.max(0, Math.round(range.startS * rec.sampleRate)));
  const end = Math.min(rec.totalFrames, Math.max(start, Math.round(range.endS * rec.sampleRate)));
  return { start, end };
}

/** Whole frames in `samples` samples (partial last frame dropped). */
export function frameCount(samples: number, nfft: number, hop: number): number {
  return samples < nfft ? 0 : Math.floor((samples - nfft) / hop) + 1;
}

/** Whole processing windows in `frames` frames. */
export function windowCount(frames: number, snapshotsPerWindow: number, windowHop: number): number {
  return frames < snapshotsPerWindow ? 0 : Math.floor((frames - snapshotsPerWindow) / windowHop) + 1;
}

/** Everything needed to place frames and windows in time. */
export interface WindowTiming {
  sampleRate: number;
  nfft: number;
  hop: number;
  snapshotsPerWindow: number;
  windowHop: number;
  /** First sample of the processed range (s0). */
  firstSample: number;
  frames: number;
  windows: number;
}

export function windowTiming(params: Pick<BeamformParams, 'nfft' | 'hop' | 'snapshotsPerWindow' | 'windowHop' | 'timeRange'>, rec: Pick<RecordingShape, 'sampleRate' | 'totalFrames'>): WindowTiming {
  const { start, end } = rangeToSamples(params.timeRange, rec);
  const frames = frameCount(end - start, params.nfft, params.hop);
  return {
    sampleRate: rec.sampleRate,
    nfft: params.nfft,
    hop: params.hop,
    snapshotsPerWindow: params.snapshotsPerWindow,
    windowHop: params.windowHop,
    firstSample: start,
    frames,
    windows: windowCount(frames, params.snapshotsPerWindow, params.windowHop),
  };
}

/**
 * Time span of window j in seconds from the recording's first sample (CONVENTIONS.md):
 * t_start = (s0 + j·whop·hop)/fs, t_end = (s0 + (j·whop + K − 1)·hop + nfft)/fs.
 */
export function windowSpanS(j: number, t: Omit<WindowTiming, 'frames' | 'windows'>): { startS: number; endS: number } {
  const firstFrame = j * t.windowHop;
  return {
    startS: (t.firstSample + firstFrame * t.hop) / t.sampleRate,
    endS: (t.firstSample + (firstFrame + t.snapshotsPerWindow - 1) * t.hop + t.nfft) / t.sampleRate,
  };
}

/** Effective support of the estimator in snapshots: K, or (1+α)/(1−α) for exponential forgetting (DOMAIN.md §2). */
export function effectiveSnapshots(params: Pick<BeamformParams, 'snapshotsPerWindow' | 'estimator'>): number {
  if (params.estimator.kind === 'exponential') {
    const a = params.estimator.alpha;
    return Math.min(params.snapshotsPerWindow, (1 + a) / (1 - a));
  }
  return params.snapshotsPerWindow;
}
