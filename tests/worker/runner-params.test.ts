/**
 * Job parameters (shared/params): schema messages, derived layout and validation against a
 * recording and an array.
 */
import { expect } from 'chai';
import { lineArray } from '../../shared/arrays/array-geometry.js';
import { parseBeamformParams, beamformParamsSchema, findBeamIndex, type BeamformParamsInput } from '../../shared/params/beamform-params.js';
import { binFrequencyHz, expandBeamFan, frameCount, selectBins, windowCount, windowTiming } from '../../shared/params/job-layout.js';
import { trainingPlan } from '../../shared/params/training-plan.js';
import { validateParamsAgainstRecording, type RecordingInfo } from '../../shared/params/validate-against-recording.js';

const good: BeamformParamsInput = {
  schemaVersion: 1,
  nfft: 512,
  hop: 256,
  band: { fLoHz: 200, fHiHz: 1500 },
  snapshotsPerWindow: 64,
  windowHop: 32,
  loading: { kind: 'noise-floor', levelDb: -10 },
  beamformer: { kind: 'mvdr', training: { source: 'range', startS: 0, endS: 20 } },
  beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 2 },
  savedBeams: [{ azimuthDeg: -60 }, { azimuthDeg: 0 }],
};
const rec: RecordingInfo = { sampleRate: 8000, totalFrames: 8000 * 600, complex: false, centerFrequencyHz: 0, channels: 32 };
const array = lineArray({ name: 'bench line', count: 32, spacingM: 0.5, speedOfSoundMps: 1500 });

const problemsOf = (input: unknown) => {
  const r = parseBeamformParams(input);
  return r.ok ? [] : r.problems.map((p) => `${p.path.join('.')}: ${p.message}`);
};

describe('job parameters: schema', () => {
  it('accepts the standard scenario and fills defaults (Hann window, sliding estimator, one elevation)', () => {
    const p = beamformParamsSchema.parse(good);
    expect(p.window).to.equal('hann');
    expect(p.estimator).to.deep.equal({ kind: 'sliding' });
    expect(p.beams.elevationsDeg).to.deep.equal([0]);
  });

  it('names the field and the fix for each bad value', () => {
    expect(problemsOf({ ...good, schemaVersion: 2 })[0]).to.match(/^schemaVersion: schemaVersion must be 1/);
    expect(problemsOf({ ...good, nfft: 500 })).to.include('nfft: nfft must be a power of two (64, 128, …, 65536)');
    expect(problemsOf({ ...good, hop: 1024 })[0]).to.match(/^hop: hop \(1024\) must not exceed nfft/);
    expect(problemsOf({ ...good, bins: [10, 11] })[0]).to.match(/^band: give exactly one of "band"/);
    expect(problemsOf({ ...good, loading: { kind: 'strong' } })[0]).to.match(/^loading.*loading.kind must be one of/);
    expect(problemsOf({ ...good, savedBeams: [{ azimuthDeg: 21 }] })[0]).to.match(/^savedBeams\.0: saved beam 21° az .* is not in the beam fan/);
    expect(problemsOf({ ...good, beams: { azimuthFromDeg: 10, azimuthToDeg: -10, azimuthStepDeg: 1 } })[0]).to.match(/azimuthToDeg must not be smaller/);
    expect(problemsOf({ ...good, beamformer: { kind: 'conventional' } })[0]).to.match(/^loading: conventional beams take no diagonal loading/);
    expect(problemsOf({ ...good, estimator: { kind: 'exponential', alpha: 1 } })[0]).to.match(/alpha must be less than 1/);
  });

  it('orders beams elevation-major and finds saved beams in the fan', () => {
    const p = beamformParamsSchema.parse({ ...good, beams: { ...good.beams, elevationsDeg: [0, 10] } });
    const fan = expandBeamFan(p.beams);
    expect(fan.azimuthsDeg.length).to.equal(182);
    expect(fan.azimuthsDeg[91]).to.equal(-90);
    expect(fan.elevationsDeg[91]).to.equal(10);
    expect(findBeamIndex(p.beams, { azimuthDeg: 0, elevationDeg: 10 })).to.equal(91 + 45);
  });
});

describe('job parameters: layout', () => {
  it('selects bins by physical frequency, f_k = k·fs/nfft (CONVENTIONS.md; DOMAIN.md §1 check: 48 kHz, 1024 → bin 32 = 1500 Hz)', () => {
    expect(binFrequencyHz(32, 1024, { sampleRate: 48000, complex: false, centerFrequencyHz: 0 })).to.equal(1500);
    const { bins, freqsHz } = selectBins({ nfft: 512, band: { fLoHz: 200, fHiHz: 1500 } }, rec);
    expect(bins[0]).to.equal(13); // 13·15.625 = 203.125 Hz
    expect(bins[bins.length - 1]).to.equal(96); // 96·15.625 = 1500 Hz
    expect(freqsHz[0]).to.equal(203.125);
  });

  it('uses the physical frequency for complex baseband: f_c + (k − nfft·[k ≥ nfft/2])·fs/nfft (DOMAIN.md §1)', () => {
    const bb = { sampleRate: 2000, complex: true, centerFrequencyHz: 750 };
    expect(binFrequencyHz(0, 64, bb)).to.equal(750);
    expect(binFrequencyHz(63, 64, bb)).to.equal(750 - 2000 / 64);
    const { bins, freqsHz } = selectBins({ nfft: 64, band: { fLoHz: 700, fHiHz: 800 } }, bb);
    expect(Array.from(freqsHz)).to.deep.equal([...freqsHz].sort((a, b) => a - b));
    expect(Array.from(bins)).to.include(0);
  });

  it('counts frames (partial last frame dropped) and windows (CONVENTIONS.md)', () => {
    expect(frameCount(511, 512, 256)).to.equal(0);
    expect(frameCount(512, 512, 256)).to.equal(1);
    expect(frameCount(1023, 512, 256)).to.equal(2);
    expect(windowCount(63, 64, 32)).to.equal(0);
    expect(windowCount(64 + 31, 64, 32)).to.equal(1);
    expect(windowCount(64 + 32, 64, 32)).to.equal(2);
    // 10 min at 8 kHz: floor((4 800 000 − 512)/256) + 1 = 18 749 frames; floor((18749 − 64)/32) + 1 = 584 windows.
    const t = windowTiming(beamformParamsSchema.parse(good), rec);
    expect([t.frames, t.windows]).to.deep.equal([18749, 584]);
  });

  it('splits an MVDR training span into disjoint halves with no shared samples', () => {
    const p = beamformParamsSchema.parse(good);
    const plan = trainingPlan(p, rec);
    const w = plan.weights!;
    const e = plan.evaluation!;
    expect(w.firstSample).to.equal(0);
    expect(e.firstSample).to.be.at.least(w.firstSample + (w.frames - 1) * 256 + 512);
    expect(w.frames + e.frames).to.equal(frameCount(20 * 8000, 512, 256) - 1);
  });
});

describe('job parameters: validation against a recording and an array', () => {
  const paths = (params: BeamformParamsInput, r: RecordingInfo = rec, a = array) =>
    validateParamsAgainstRecording(beamformParamsSchema.parse(params), r, a).map((p) => p.path.join('.'));

  it('passes the standard scenario', () => {
    expect(paths(good)).to.deep.equal([]);
  });

  it('reports Nyquist, channel map, ranges, K and WNG problems with field paths', () => {
    expect(paths({ ...good, band: { fLoHz: 200, fHiHz: 4100 } })).to.deep.equal(['band.fHiHz']);
    expect(paths(good, { ...rec, channels: 16 })).to.have.length(16).and.include('array.elements.16.channel');
    expect(paths({ ...good, timeRange: { startS: 700, endS: 800 } })).to.include('timeRange.startS');
    expect(paths({ ...good, beamformer: { kind: 'mvdr', training: { source: 'range', startS: 500, endS: 700 } } })).to.include('beamformer.training.endS');
    expect(paths({ ...good, timeRange: { startS: 0, endS: 1 } })).to.deep.equal(['snapshotsPerWindow']);
    expect(paths({ ...good, loading: { kind: 'wng-floor', minWngDb: 16 } })).to.deep.equal(['loading.minWngDb']); // 10·log10 32 = 15.05 dB
    expect(paths({ ...good, beamformer: { kind: 'mpdr' }, loading: { kind: 'none' }, snapshotsPerWindow: 16 })).to.deep.equal(['snapshotsPerWindow']);
    expect(paths({ ...good, beamformer: { kind: 'mvdr', training: { source: 'range', startS: 0, endS: 0.1 } } })).to.deep.equal(['beamformer.training']);
    expect(paths({ ...good, bins: [0, 256], band: undefined })).to.deep.equal(['bins.0', 'bins.1']);
  });

  it('skips the channel-map check for samples already routed to elements (channels: null)', () => {
    expect(paths(good, { ...rec, channels: null })).to.deep.equal([]);
  });
});
