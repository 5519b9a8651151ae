import { beamformParamsSchema, type BeamformParams } from '../../shared/params/beamform-params.js';

/** Name of the finished demo job every fresh installation shows. */
export const DEMO_JOB_NAME = 'Gannet Ledge transit: MPDR bearing sweep';

/**
 * Parameters of the demo job on the invented Gannet Ledge recording (8 kHz, 8 elements at
 * 0.5 m, sea water): 31.25 Hz bins from 150 Hz to 1.4 kHz (below the 1.5 kHz half-wavelength
 * limit of 0.5 m spacing), K = 32 snapshots (4·N, about −2.1 dB mean SMI loss by Reed, Mallett
 * & Brennan 1974), a 1° fan over the front half-plane, and weights saved for the three
 * bearings the scene's contacts come from. `windowHop` 1 gives a dense bearing–time map.
 */
export function demoJobParams(windowHop = 2): BeamformParams {
  return beamformParamsSchema.parse({
    schemaVersion: 1,
    nfft: 256,
    hop: 128,
    band: { fLoHz: 150, fHiHz: 1400 },
    snapshotsPerWindow: 32,
    windowHop,
    loading: { kind: 'noise-floor', levelDb: 3 },
    beamformer: { kind: 'mpdr' },
    beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 1 },
    savedBeams: [{ azimuthDeg: -38 }, { azimuthDeg: 21 }, { azimuthDeg: 52 }],
  });
}
