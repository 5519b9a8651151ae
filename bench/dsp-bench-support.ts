/**
 * Shared pieces of the dsp micro-benchmarks: the standard job's engine setup (bench/
 * scenario-standard.ts sizes: N = 32 line array at 0.5 m, c = 1500 m/s, fs 8 kHz, nfft 512,
 * band 200–1500 Hz = bins 13…96, K = 64, 91 beams −90°…+90°, 8 saved, MPDR, loading −10 dB re
 * the noise floor), a snapshot block with a realistic eigen-structure (three plane waves over
 * white noise, so eigenvalue spread and loading behave as in the job), and a timer that reports
 * CPU time (process.cpuUsage, user + system) next to wall time: the machine is shared, so wall
 * time is inflated by other processes' load while CPU time is not.
 */
import type { EngineSetup } from '../worker/dsp/window-engine.types.js';
import { steeringVector } from '../worker/dsp/steering.js';

export const N = 32;
export const K = 64;
export const FS = 8000;
export const NFFT = 512;
export const FIRST_BIN = 13; // 203.1 Hz
export const BINS = 84; // up to bin 96 = 1500 Hz
export const BEAMS = 91;
export const WINDOWS_10_MIN = 584;

export function standardSetup(over: Partial<EngineSetup> = {}): EngineSetup {
  const positions = new Float64Array(3 * N);
  for (let i = 0; i < N; i++) positions[3 * i] = i * 0.5;
  return {
    channels: N,
    positionsM: positions,
    speedMps: 1500,
    binFreqsHz: Float64Array.from({ length: BINS }, (_, i) => ((FIRST_BIN + i) * FS) / NFFT),
    azimuthsDeg: Float64Array.from({ length: BEAMS }, (_, i) => -90 + 2 * i),
    elevationsDeg: new Float64Array(BEAMS),
    savedBeams: Int32Array.from([15, 26, 35, 42, 45, 55, 65, 71]), // −60, −38, −20, −6, 0, 20, 40, 52°
    beamformer: 'mpdr',
    loading: { kind: 'noise-floor', levelDb: -10 },
    snapshotsPerWindow: K,
    ...over,
  };
}

/** mulberry32 + Box–Muller (common practice), seeded so every run sees the same data. */
function gaussian(seed: number): () => number {
  let s = seed >>> 0;
  const uniform = () => {
    let t = (s = (s + 0x6d2b79f5) >>> 0);
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
}

/** Snapshot block (layout of window-engine.types.ts) for `setup`: sources at −38°, 6°, 52° (30, 20, 10 dB) over unit noise. */
export function sceneBlock(setup: EngineSetup, k: number, seed = 7): Float64Array {
  const g = gaussian(seed);
  const nBins = setup.binFreqsHz.length;
  const n = setup.channels;
  const block = new Float64Array(nBins * k * n * 2);
  const sources = [
    { az: -38, amp: Math.sqrt(1000 / 2) },
    { az: 6, amp: Math.sqrt(100 / 2) },
    { az: 52, amp: Math.sqrt(10 / 2) },
  ];
  for (let b = 0; b < nBins; b++) {
    const vs = sources.map((s) => steeringVector(setup.positionsM, setup.binFreqsHz[b], s.az, 0, setup.speedMps));
    for (let kk = 0; kk < k; kk++) {
      const base = (b * k + kk) * n * 2;
      for (let i = 0; i < 2 * n; i++) block[base + i] = g() * Math.SQRT1_2;
      sources.forEach((s, si) => {
        const ar = g() * s.amp;
        const ai = g() * s.amp;
        const v = vs[si];
        for (let i = 0; i < n; i++) {
          block[base + 2 * i] += ar * v[2 * i] - ai * v[2 * i + 1];
          block[base + 2 * i + 1] += ar * v[2 * i + 1] + ai * v[2 * i];
        }
      });
    }
  }
  return block;
}

export interface Timing {
  cpuUs: number;
  wallUs: number;
}

/**
 * Runs `body` a few times to warm the JIT, then `reps` times; returns CPU and wall µs per unit
 * (`perUnit` units per call, normally the 84 bins of a window) and prints one line.
 */
export function timeIt(label: string, reps: number, perUnit: number, body: () => void): Timing {
  for (let i = 0; i < Math.max(3, reps >> 2); i++) body();
  const c0 = process.cpuUsage();
  const t0 = process.hrtime.bigint();
  for (let r = 0; r < reps; r++) body();
  const wallUs = Number(process.hrtime.bigint() - t0) / 1e3 / reps / perUnit;
  const c = process.cpuUsage(c0);
  const cpuUs = (c.user + c.system) / reps / perUnit;
  console.log(`${label.padEnd(46)} ${cpuUs.toFixed(1).padStart(8)} µs CPU ${wallUs.toFixed(1).padStart(8)} µs wall   per window-bin`);
  return { cpuUs, wallUs };
}
