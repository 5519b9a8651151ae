/**
 * Turns a job's parameters, its array and the recording's shape into the engine's EngineSetup
 * (active element positions, bins with their physical frequencies, the beam fan, saved beams).
 */
import type { ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import type { BeamformParams } from '../../shared/params/beamform-params.js';
import { expandBeamFan, savedBeamIndices, selectBins, type RecordingShape } from '../../shared/params/job-layout.js';
import type { EngineSetup } from '../dsp/window-engine.types.js';

export interface JobGeometry {
  setup: EngineSetup;
  /** FFT bin index of each processed bin. */
  bins: Int32Array;
}

export function buildEngineSetup(params: BeamformParams, array: ArrayGeometry, rec: Pick<RecordingShape, 'sampleRate' | 'complex' | 'centerFrequencyHz'>): JobGeometry {
  const active = array.elements.filter((e) => !e.excluded);
  const positionsM = new Float64Array(active.length * 3);
  active.forEach((e, i) => positionsM.set(e.position, 3 * i));
  const { bins, freqsHz } = selectBins(params, rec);
  const fan = expandBeamFan(params.beams);
  return {
    bins,
    setup: {
      channels: active.length,
      positionsM,
      speedMps: params.speedOfSoundMps ?? array.speedOfSoundMps,
      binFreqsHz: freqsHz,
      azimuthsDeg: fan.azimuthsDeg,
      elevationsDeg: fan.elevationsDeg,
      savedBeams: savedBeamIndices(params),
      beamformer: params.beamformer.kind,
      loading: params.loading,
      snapshotsPerWindow: params.snapshotsPerWindow,
    },
  };
}
