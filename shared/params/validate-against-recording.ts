import type { ArrayGeometry } from '../arrays/array-geometry.js';
import type { BeamformParams, ParamsProblem, TimeRange } from './beamform-params.js';
import { selectBins, windowTiming, type RecordingShape } from './job-layout.js';
import { trainingPlan } from './training-plan.js';

/** What validation needs to know about a recording: its shape plus its channel count. */
export interface RecordingInfo extends RecordingShape {
  /**
   * Channels in the file. null when the samples are already routed to the array's elements
   * (a FrameSource in the job runner), which skips the channel-map check.
   */
  channels: number | null;
}

/**
 * A training block of nBins·frames·N complex doubles is held in memory while the job runs;
 * longer noise-only spans are refused rather than swapping the compute child to death.
 */
export const MAX_TRAINING_BLOCK_BYTES = 128 * 1024 * 1024;

/** Out-of-range bins named one by one before the rest are only counted. */
const MAX_NAMED_BINS = 10;

const fmt = (x: number, digits = 3): string => String(Number(x.toFixed(digits)));

/**
 * Checks parameters that are valid on their own against a concrete recording and array, and
 * returns every problem found (empty when the job can run). Paths point at the field to change:
 * params fields as in params.json, array fields prefixed with 'array', training-recording
 * fields prefixed with 'trainingRecording'. Pure: the queue, the browser and the CLI share it.
 */
export function validateParamsAgainstRecording(params: BeamformParams, rec: RecordingInfo, array: ArrayGeometry, trainingRec?: RecordingInfo): ParamsProblem[] {
  const problems: ParamsProblem[] = [];
  const add = (path: (string | number)[], message: string) => problems.push({ path, message });
  const fs = rec.sampleRate;
  const durationS = rec.totalFrames / fs;

  if (!(fs > 0)) add(['recording', 'sampleRate'], 'the recording has no valid sample rate');

  // Channels: every active element must be fed by a channel the recording has.
  const active = array.elements.map((e, i) => ({ e, i })).filter(({ e }) => !e.excluded);
  const n = active.length;
  for (const { e, i } of active) {
    if (rec.channels !== null && e.channel >= rec.channels) {
      add(['array', 'elements', i, 'channel'], `element ${i} reads channel ${e.channel}, but the recording has ${rec.channels} channel${rec.channels === 1 ? '' : 's'} (numbered from 0); fix the array's channel map or pick the right recording`);
    }
  }

  // Frequencies: inside Nyquist (real) or inside the captured band (complex), and at least one bin.
  const binSpacing = fs / params.nfft;
  if (params.band) {
    const { fLoHz, fHiHz } = params.band;
    if (!rec.complex) {
      if (fHiHz > fs / 2) add(['band', 'fHiHz'], `${fmt(fHiHz)} Hz is above the Nyquist frequency ${fmt(fs / 2)} Hz of this recording (fs ${fmt(fs)} Hz); lower fHiHz`);
      if (fLoHz < 0) add(['band', 'fLoHz'], 'fLoHz cannot be negative for a real recording');
    } else {
      const lo = rec.centerFrequencyHz - fs / 2;
      const hi = rec.centerFrequencyHz + fs / 2;
      if (fLoHz < lo || fHiHz > hi) add(['band'], `the band ${fmt(fLoHz)}–${fmt(fHiHz)} Hz leaves the captured band ${fmt(lo)}–${fmt(hi)} Hz (centre ${fmt(rec.centerFrequencyHz)} Hz, fs ${fmt(fs)} Hz)`);
    }
  }
  if (params.bins) {
    const maxBin = rec.complex ? params.nfft - 1 : params.nfft / 2 - 1;
    const minBin = rec.complex ? 0 : 1;
    // The first few bad bins by name; the rest counted, so 60 000 wrong bins give a short answer.
    let bad = 0;
    params.bins.forEach((k, i) => {
      if (k >= minBin && k <= maxBin) return;
      if (++bad <= MAX_NAMED_BINS) add(['bins', i], `bin ${k} is outside ${minBin}..${maxBin}, the usable bins for nfft ${params.nfft} on a ${rec.complex ? 'complex' : 'real'} recording${rec.complex ? '' : ' (DC and Nyquist are never steered)'}`);
    });
    if (bad > MAX_NAMED_BINS) add(['bins'], `${bad - MAX_NAMED_BINS} more bins are outside ${minBin}..${maxBin} as well; keep only bins in that range`);
  }
  if (problems.every((p) => p.path[0] !== 'band' && p.path[0] !== 'bins') && fs > 0) {
    const { bins } = selectBins(params, rec);
    if (bins.length === 0) add([params.band ? 'band' : 'bins'], `the band contains no FFT bin (bins are ${fmt(binSpacing)} Hz apart at nfft ${params.nfft}); widen the band or raise nfft`);
  }

  // Time ranges inside the recording.
  const checkRange = (path: (string | number)[], r: TimeRange, recDuration: number, what: string) => {
    if (r.startS >= recDuration) add([...path, 'startS'], `${what} starts at ${fmt(r.startS)} s, after the end of the recording (${fmt(recDuration)} s)`);
    else if (r.endS > recDuration + 1 / fs) add([...path, 'endS'], `${what} ends at ${fmt(r.endS)} s, after the end of the recording (${fmt(recDuration)} s)`);
  };
  if (params.timeRange) checkRange(['timeRange'], params.timeRange, durationS, 'the processed span');

  // Enough frames for one window of K snapshots.
  const timing = windowTiming(params, rec);
  const K = params.snapshotsPerWindow;
  if (fs > 0 && timing.windows === 0) {
    const needS = ((K - 1) * params.hop + params.nfft) / fs;
    add(['snapshotsPerWindow'], `the processed span gives ${timing.frames} frame${timing.frames === 1 ? '' : 's'}, but one window needs K = ${K} frames (${fmt(needS)} s of data); lower snapshotsPerWindow or process a longer span`);
  }

  const bf = params.beamformer;
  const unloaded = params.loading.kind === 'none';
  if (bf.kind === 'mpdr' && unloaded && K < n) {
    add(['snapshotsPerWindow'], `MPDR without loading needs K ≥ N: K = ${K} snapshots cannot give an invertible covariance for N = ${n} elements; raise K (≥ ${2 * n - 3} keeps the mean SNR loss within 3 dB, Reed, Mallett & Brennan 1974) or add diagonal loading`);
  }
  if (params.loading.kind === 'wng-floor') {
    const maxDb = 10 * Math.log10(n);
    if (params.loading.minWngDb > maxDb) add(['loading', 'minWngDb'], `a white-noise gain of ${fmt(params.loading.minWngDb, 2)} dB is impossible with N = ${n} elements (the maximum is 10·log10 N = ${fmt(maxDb, 2)} dB)`);
  }

  // Training data.
  if (bf.kind === 'mvdr' && bf.training.source === 'range') {
    checkRange(['beamformer', 'training'], bf.training, durationS, 'the training span');
  }
  if (bf.kind === 'mvdr' && bf.training.source === 'recording') {
    if (!trainingRec) {
      add(['beamformer', 'training', 'recordingRef'], `the training recording "${bf.training.recordingRef}" could not be described; check that it exists`);
    } else {
      if (trainingRec.sampleRate !== fs) add(['trainingRecording', 'sampleRate'], `the training recording runs at ${fmt(trainingRec.sampleRate)} Hz but the recording at ${fmt(fs)} Hz; they must match`);
      if (trainingRec.complex !== rec.complex) add(['trainingRecording'], 'the training recording and the recording must both be real or both be complex baseband');
      if (rec.complex && trainingRec.centerFrequencyHz !== rec.centerFrequencyHz) add(['trainingRecording', 'centerFrequencyHz'], 'the training recording was captured at another centre frequency');
      const maxCh = active.reduce((m, { e }) => Math.max(m, e.channel), 0);
      if (trainingRec.channels !== null && maxCh >= trainingRec.channels) add(['trainingRecording', 'channels'], `the array reads channel ${maxCh}, but the training recording has only ${trainingRec.channels} channels`);
      if (bf.training.range) checkRange(['beamformer', 'training', 'range'], bf.training.range, trainingRec.totalFrames / trainingRec.sampleRate, 'the training span');
    }
  }
  if (bf.kind === 'mpdr' && bf.noiseRange) checkRange(['beamformer', 'noiseRange'], bf.noiseRange, durationS, 'the noise-only span');

  const rangeProblems = problems.some((p) => p.path[0] === 'beamformer' || p.path[0] === 'trainingRecording');
  if (!rangeProblems && bf.kind !== 'conventional' && !(bf.kind === 'mvdr' && bf.training.source === 'recording' && !trainingRec)) {
    const plan = trainingPlan(params, rec, trainingRec);
    const nBins = params.bins?.length ?? selectBins(params, rec).bins.length;
    const path = bf.kind === 'mvdr' ? ['beamformer', 'training'] : ['beamformer', 'noiseRange'];
    if (bf.kind === 'mvdr') {
      const ka = plan.weights?.frames ?? 0;
      const ke = plan.evaluation?.frames ?? 0;
      if (ka < 1 || ke < 2) {
        add(path, `the training span gives ${ka + ke} usable frames; it needs at least 3 (the first half builds the weights, the second half, at least 2 frames, evaluates the noise power) — lengthen it to well over ${fmt((4 * params.nfft) / fs)} s`);
      } else if (unloaded && ka < n) {
        add(path, `the first half of the training span gives ${ka} snapshots, fewer than the N = ${n} elements, so the noise covariance cannot be inverted without loading; lengthen the span (≥ ${fmt(((2 * n + 1) * params.hop + params.nfft) / fs, 2)} s) or add diagonal loading`);
      }
      const biggest = Math.max(ka, ke) * nBins * n * 16;
      if (biggest > MAX_TRAINING_BLOCK_BYTES) add(path, `the training span is too long to hold in memory (${Math.round(biggest / 2 ** 20)} MB per half for ${nBins} bins × ${n} elements; the limit is ${MAX_TRAINING_BLOCK_BYTES / 2 ** 20} MB); shorten it`);
    } else if (plan.evaluation) {
      if (plan.evaluation.frames < 2) add(path, `the noise-only span gives ${plan.evaluation.frames} frame${plan.evaluation.frames === 1 ? '' : 's'}; the noise-power estimate needs at least 2 (${fmt((params.nfft + params.hop) / fs)} s); lengthen it`);
      const bytes = plan.evaluation.frames * nBins * n * 16;
      if (bytes > MAX_TRAINING_BLOCK_BYTES) add(path, `the noise-only span is too long to hold in memory (${Math.round(bytes / 2 ** 20)} MB); shorten it`);
    }
  }

  // Weights' look directions must be steerable with a known speed.
  const speed = params.speedOfSoundMps ?? array.speedOfSoundMps;
  if (!(speed > 0)) add(['speedOfSoundMps'], 'no propagation speed: give speedOfSoundMps or set it on the array');
  return problems;
}
