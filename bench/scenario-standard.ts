/**
 * The standard benchmark scenario: a 32-element line array at 0.5 m in sea water (1500 m/s),
 * fs 8 kHz, 16-bit WAV, nfft 512, hop 256, band 200–1500 Hz, K = 64 snapshots, window hop
 * 32 frames, 91 beams from −90° to +90° (2° apart), loading −10 dB re the noise floor, weights
 * saved for 8 beams. The recording is the invented Gannet Ledge scene from the samples
 * generator, generated once into bench/out/ and reused.
 *
 * MPDR is the beamformer: it factors a fresh covariance in every window and bin, the costlier
 * of the adaptive paths (MVDR reuses weights fixed by its training span), so the figures are an
 * upper bound for MVDR jobs of the same size.
 */
import fs from 'node:fs';
import path from 'node:path';
import { arrayGeometrySchema, type ArrayGeometry } from '../shared/arrays/array-geometry.js';
import { beamformParamsSchema, type BeamformParams } from '../shared/params/beamform-params.js';
import { generateScenario } from '../samples/scenario/generate-scenario.js';

export const STANDARD = { channels: 32, spacingM: 0.5, speedMps: 1500, sampleRate: 8000 } as const;

export const standardParams: BeamformParams = beamformParamsSchema.parse({
  schemaVersion: 1,
  nfft: 512,
  hop: 256,
  window: 'hann',
  band: { fLoHz: 200, fHiHz: 1500 },
  snapshotsPerWindow: 64,
  windowHop: 32,
  estimator: { kind: 'sliding' },
  loading: { kind: 'noise-floor', levelDb: -10 },
  beamformer: { kind: 'mpdr' },
  beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 2, elevationsDeg: [0] },
  savedBeams: [-60, -38, -20, -6, 0, 20, 40, 52].map((azimuthDeg) => ({ azimuthDeg, elevationDeg: 0 })),
});

export interface StandardRecording {
  wavPath: string;
  array: ArrayGeometry;
  seconds: number;
  generatedNow: boolean;
}

/** The cached recording for `minutes`, generated (with progress on stderr) when missing. */
export function standardRecording(outRoot: string, minutes: number): StandardRecording {
  const dir = path.join(outRoot, `standard-${minutes}min`);
  const stamp = path.join(dir, 'complete.json');
  let generatedNow = false;
  const cached = fs.existsSync(stamp) ? (JSON.parse(fs.readFileSync(stamp, 'utf8')) as { dataFile?: string }).dataFile : undefined;
  let wavPath = cached ?? '';
  if (!cached || !fs.existsSync(cached)) {
    const started = Date.now();
    let last = 0;
    const result = generateScenario({
      outDir: dir,
      baseName: 'gannet-ledge',
      durationS: minutes * 60,
      channels: STANDARD.channels,
      spacingM: STANDARD.spacingM,
      sampleRate: STANDARD.sampleRate,
      speedMps: STANDARD.speedMps,
      format: minutes * 60 * STANDARD.sampleRate * STANDARD.channels * 2 > 4e9 ? 'rf64' : 'wav',
      encoding: 'i16',
      onProgress: (done, total) => {
        if (Date.now() - last < 2000 && done < total) return;
        last = Date.now();
        process.stderr.write(`generating the ${minutes}-minute scene: ${((100 * done) / total).toFixed(0)} %\n`);
      },
    });
    wavPath = result.dataFile;
    fs.writeFileSync(stamp, JSON.stringify({ minutes, dataFile: wavPath, generatedInS: (Date.now() - started) / 1000 }) + '\n');
    generatedNow = true;
  }
  const array = arrayGeometrySchema.parse(JSON.parse(fs.readFileSync(path.join(dir, 'array.json'), 'utf8')));
  return { wavPath, array, seconds: minutes * 60, generatedNow };
}
