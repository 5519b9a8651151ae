/**
 * Regenerates the small committed demo set in samples/demo/ (deterministic seeds), used by
 * tests and as the service's demo data: `node --import tsx samples/make-demo.ts`.
 */
import { rmSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { generateScenario } from './scenario/generate-scenario.js';

const dir = join(dirname(fileURLToPath(import.meta.url)), 'demo');
rmSync(dir, { recursive: true, force: true });
const common = { outDir: dir, channels: 8, spacingM: 0.5, seed: 7 } as const;
// 8-element line, 8 kHz, 16-bit PCM WAV, 5 s, with a dead element 6 for the QC view.
generateScenario({ ...common, baseName: 'gannet-ledge-8ch', durationS: 5, sampleRate: 8000, format: 'wav', encoding: 'i16', deadChannel: 6, truthFileName: 'scenario.json' });
// Same scene as complex baseband SigMF (ci16_le), centre 750 Hz at 2 kS/s, 4 s.
generateScenario({ ...common, baseName: 'gannet-ledge-8ch-baseband', durationS: 4, sampleRate: 2000, format: 'sigmf', encoding: 'i16', complex: true, centerFrequencyHz: 750, truthFileName: 'gannet-ledge-8ch-baseband.scenario.json' });
// Raw planar 16-bit with a JSON side file, 2 s, driven into clipping.
generateScenario({ ...common, baseName: 'gannet-ledge-8ch-planar', durationS: 2, sampleRate: 8000, format: 'raw', encoding: 'i16', layout: 'planar', clip: true, truthFileName: 'gannet-ledge-8ch-planar.scenario.json' });
console.log(`Demo set written to ${dir}`);
