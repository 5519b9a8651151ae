/**
 * A small real beamform scene for the queue suites: a tone-comb WAV on an 8-element line array
 * (written with the benchmark's scene writer), a ready recording row pointing at it, and job
 * parameters sized so a job has a few hundred short windows (long enough to cancel or kill
 * mid-way, short enough for 2 cores).
 */
import fs from 'node:fs';
import path from 'node:path';
import { writeToneCombWav } from '../../../bench/scenario-tone-comb.js';
import type { DatabaseHandle } from '../../../server/db/client.js';
import { recordings } from '../../../server/db/schema/recordings.js';
import { lineArray, type ArrayGeometry } from '../../../shared/arrays/array-geometry.js';
import { readRecordingDescription } from '../../../worker/io/index.js';
import { beamformParamsSchema, type BeamformParams } from '../../../shared/params/beamform-params.js';

export const SCENE_ARRAY: ArrayGeometry = lineArray({ name: 'queue test line', count: 8, spacingM: 0.5, speedOfSoundMps: 1500 });

export function sceneParams(windowHop = 2): BeamformParams {
  return beamformParamsSchema.parse({
    schemaVersion: 1,
    nfft: 256,
    hop: 128,
    band: { fLoHz: 600, fHiHz: 1400 },
    snapshotsPerWindow: 32,
    windowHop,
    loading: { kind: 'noise-floor', levelDb: 0 },
    beamformer: { kind: 'mpdr' },
    beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 2 },
    savedBeams: [{ azimuthDeg: 20 }, { azimuthDeg: -40 }],
  });
}

export async function writeSceneWav(dir: string, seconds: number, name = 'scene.wav'): Promise<string> {
  const file = path.join(dir, name);
  if (!fs.existsSync(file)) {
    await writeToneCombWav(file, {
      sampleRate: 8000,
      seconds,
      array: SCENE_ARRAY,
      sources: [{ azimuthDeg: 20, tonesHz: [687.5, 906.25, 1187.5], amplitude: 0.1 }],
      noiseStd: 0.01,
      seed: 7,
    });
  }
  return file;
}

/** Registers the WAV as a ready recording (as inspection would leave it) and returns its id. */
export async function insertReadyRecording(h: Pick<DatabaseHandle, 'db'> & Partial<DatabaseHandle>, file: string, ownerId: number): Promise<number> {
  const d = await readRecordingDescription('wav', file);
  const [r] = await h.db
    .insert(recordings)
    .values({
      name: path.basename(file),
      source: 'upload',
      filePath: file,
      declaredFormat: 'wav',
      format: 'wav',
      sizeBytes: fs.statSync(file).size,
      channels: d.channels,
      sampleRate: d.sampleRate,
      sampleFrames: d.frames,
      durationS: d.frames / d.sampleRate,
      state: 'ready',
      uploadedBy: ownerId,
    })
    .returning({ id: recordings.id });
  return r.id;
}
