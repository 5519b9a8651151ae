import type { EngineSetup } from '../../../worker/dsp/window-engine.types.js';
import { steeringVector } from '../../../worker/dsp/steering.js';
import { choleskyFactor } from '../../../worker/dsp/hermitian-cholesky.js';

/** N-element line along x at spacing d (metres). */
export function lineArray(n: number, spacingM: number): Float64Array {
  const p = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) p[3 * i] = i * spacingM;
  return p;
}

/** Azimuth (degrees) whose sine is u, for a line array along x at el = 0. */
export const azimuthForSine = (u: number): number => (Math.asin(u) * 180) / Math.PI;

/** R += power·v·vᴴ (flat interleaved). */
export function addRankOne(r: Float64Array, v: Float64Array, power: number, n: number): void {
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      r[2 * (i * n + j)] += power * (v[2 * i] * v[2 * j] + v[2 * i + 1] * v[2 * j + 1]);
      r[2 * (i * n + j) + 1] += power * (v[2 * i + 1] * v[2 * j] - v[2 * i] * v[2 * j + 1]);
    }
  }
}

export function identity(n: number, scale = 1): Float64Array {
  const r = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) r[2 * (i * n + i)] = scale;
  return r;
}

/**
 * A snapshot block (one bin, K = N snapshots) whose sample covariance is exactly R:
 * x_k = √N·(column k of L), L·Lᴴ = R, so (1/N)·Σ x_k x_kᴴ = R.
 */
export function blockWithCovariance(r: Float64Array, n: number): Float64Array {
  const l = new Float64Array(2 * n * n);
  if (!choleskyFactor(l, r, n)) throw new Error('scene covariance is not positive definite');
  const block = new Float64Array(2 * n * n);
  const s = Math.sqrt(n);
  for (let k = 0; k < n; k++) {
    for (let i = k; i < n; i++) {
      block[2 * (k * n + i)] = s * l[2 * (i * n + k)];
      block[2 * (k * n + i) + 1] = s * l[2 * (i * n + k) + 1];
    }
  }
  return block;
}

/** Engine setup for one bin at 1500 Hz, c = 1500 m/s (λ = 1 m), looks given in degrees. */
export function oneBinSetup(positionsM: Float64Array, azimuths: number[], over: Partial<EngineSetup> = {}): EngineSetup {
  return {
    channels: positionsM.length / 3,
    positionsM,
    speedMps: 1500,
    binFreqsHz: Float64Array.from([1500]),
    azimuthsDeg: Float64Array.from(azimuths),
    elevationsDeg: new Float64Array(azimuths.length),
    savedBeams: Int32Array.from(azimuths.map((_, i) => i)),
    beamformer: 'mvdr',
    loading: { kind: 'none' },
    snapshotsPerWindow: positionsM.length / 3,
    ...over,
  };
}

export const steer = (pos: Float64Array, azDeg: number): Float64Array => steeringVector(pos, 1500, azDeg, 0, 1500);

/** |wᴴ·v|² for interleaved vectors. */
export function responsePower(w: Float64Array, wOff: number, v: Float64Array, n: number): number {
  let re = 0;
  let im = 0;
  for (let i = 0; i < n; i++) {
    const wr = w[wOff + 2 * i];
    const wi = w[wOff + 2 * i + 1];
    re += wr * v[2 * i] + wi * v[2 * i + 1];
    im += wr * v[2 * i + 1] - wi * v[2 * i];
  }
  return re * re + im * im;
}

export const db = (x: number): number => 10 * Math.log10(x);
