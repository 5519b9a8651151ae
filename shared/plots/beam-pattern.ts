/**
 * Beam patterns for the results page: the response |wᴴ·v(θ)|² of a weight vector over a fine
 * azimuth grid, with the steering vector of CONVENTIONS.md, v_n = exp(+j·2π·f·(p_n·u)/c),
 * u = (sin az·cos el, cos az·cos el, sin el). Pure and allocation-light (typed arrays), so the
 * browser draws an adapted pattern from the weights a plot endpoint returns.
 */

export interface PatternInput {
  /** Element positions in metres, [x, y, z] per element, in weight order. */
  positionsM: readonly (readonly [number, number, number])[];
  freqHz: number;
  speedMps: number;
  /** Complex weights [re, im] per element. */
  weights: readonly (readonly [number, number])[];
  elevationDeg?: number;
}

/** Evenly spaced azimuths from..to inclusive (degrees). */
export function azimuthGrid(fromDeg: number, toDeg: number, stepDeg: number): Float64Array {
  if (!(stepDeg > 0) || toDeg < fromDeg) throw new RangeError(`azimuth grid needs from ≤ to and a positive step, got ${fromDeg}..${toDeg} by ${stepDeg}`);
  const n = Math.floor((toDeg - fromDeg) / stepDeg + 1e-9) + 1;
  return Float64Array.from({ length: n }, (_, i) => fromDeg + i * stepDeg);
}

/** |wᴴ·v(az)|² for every azimuth of the grid (linear power response). */
export function beamPattern(input: PatternInput, azimuthsDeg: Float64Array): Float64Array {
  const { positionsM, weights, freqHz, speedMps } = input;
  const n = positionsM.length;
  if (weights.length !== n) throw new RangeError(`${weights.length} weights for ${n} elements`);
  if (!(speedMps > 0)) throw new RangeError(`propagation speed must be positive, got ${speedMps}`);
  const el = ((input.elevationDeg ?? 0) * Math.PI) / 180;
  const k = (2 * Math.PI * freqHz) / speedMps;
  const out = new Float64Array(azimuthsDeg.length);
  for (let a = 0; a < azimuthsDeg.length; a++) {
    const az = (azimuthsDeg[a] * Math.PI) / 180;
    const ux = Math.sin(az) * Math.cos(el);
    const uy = Math.cos(az) * Math.cos(el);
    const uz = Math.sin(el);
    let re = 0;
    let im = 0;
    for (let i = 0; i < n; i++) {
      const p = positionsM[i];
      const phase = k * (p[0] * ux + p[1] * uy + p[2] * uz);
      const c = Math.cos(phase);
      const s = Math.sin(phase);
      const [wr, wi] = weights[i];
      // conj(w)·v = (wr − j·wi)(c + j·s)
      re += wr * c + wi * s;
      im += wr * s - wi * c;
    }
    out[a] = re * re + im * im;
  }
  return out;
}

/** Conventional (delay-and-sum) weights w = v(look)/N for the same array and frequency. */
export function conventionalWeights(input: Omit<PatternInput, 'weights'>, lookAzimuthDeg: number): [number, number][] {
  const n = input.positionsM.length;
  const el = ((input.elevationDeg ?? 0) * Math.PI) / 180;
  const az = (lookAzimuthDeg * Math.PI) / 180;
  const u = [Math.sin(az) * Math.cos(el), Math.cos(az) * Math.cos(el), Math.sin(el)];
  const k = (2 * Math.PI * input.freqHz) / input.speedMps;
  return input.positionsM.map((p) => {
    const phase = k * (p[0] * u[0] + p[1] * u[1] + p[2] * u[2]);
    return [Math.cos(phase) / n, Math.sin(phase) / n];
  });
}

/** Local minima of a pattern that lie at least `depthDb` below the pattern's peak (the nulls). */
export function findNulls(patternDb: Float64Array, depthDb = 20): number[] {
  let peak = -Infinity;
  for (const v of patternDb) peak = Math.max(peak, v);
  const out: number[] = [];
  for (let i = 1; i < patternDb.length - 1; i++) {
    if (patternDb[i] < patternDb[i - 1] && patternDb[i] <= patternDb[i + 1] && patternDb[i] < peak - depthDb) out.push(i);
  }
  return out;
}
