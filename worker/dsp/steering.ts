/**
 * Steering vectors for the forward transform exp(−j2πkn/nfft) (CONVENTIONS.md "Geometry"):
 *   u = (sin az·cos el, cos az·cos el, sin el),  τ_n = p_n·u / c,  v_n(f, u) = exp(+j2πf·τ_n).
 * Written into caller-owned interleaved (re, im) buffers.
 */

const DEG = Math.PI / 180;

/** Unit vector toward the source for azimuth/elevation in degrees, written to out[0..2]. */
export function lookUnitVector(out: Float64Array, azimuthDeg: number, elevationDeg: number): void {
  const az = azimuthDeg * DEG;
  const el = elevationDeg * DEG;
  const ce = Math.cos(el);
  out[0] = Math.sin(az) * ce;
  out[1] = Math.cos(az) * ce;
  out[2] = Math.sin(el);
}

/**
 * Per-element lead times τ_n = p_n·u/c in seconds for one look direction.
 * positionsM is [x0,y0,z0,x1,…] (length 3N); out has length ≥ N.
 */
export function elementLeadsS(out: Float64Array, positionsM: Float64Array, azimuthDeg: number, elevationDeg: number, speedMps: number): void {
  if (!(speedMps > 0)) throw new RangeError(`propagation speed must be positive, got ${speedMps} m/s`);
  const az = azimuthDeg * DEG;
  const el = elevationDeg * DEG;
  const ce = Math.cos(el);
  const ux = Math.sin(az) * ce;
  const uy = Math.cos(az) * ce;
  const uz = Math.sin(el);
  const n = positionsM.length / 3;
  for (let i = 0; i < n; i++) {
    out[i] = (positionsM[3 * i] * ux + positionsM[3 * i + 1] * uy + positionsM[3 * i + 2] * uz) / speedMps;
  }
}

/** v_n = exp(+j2πf·τ_n) from precomputed lead times; out is (re, im) interleaved, length ≥ 2N. */
export function steeringFromLeads(out: Float64Array, leadsS: Float64Array, frequencyHz: number, channels: number, outOffset = 0): void {
  const k = 2 * Math.PI * frequencyHz;
  for (let i = 0; i < channels; i++) {
    const phase = k * leadsS[i];
    out[outOffset + 2 * i] = Math.cos(phase);
    out[outOffset + 2 * i + 1] = Math.sin(phase);
  }
}

/** Convenience form: v(f, az, el) for one direction into a new array (not for hot loops). */
export function steeringVector(positionsM: Float64Array, frequencyHz: number, azimuthDeg: number, elevationDeg: number, speedMps: number): Float64Array {
  if (positionsM.length % 3 !== 0 || positionsM.length === 0) {
    throw new RangeError(`element positions must be [x,y,z] triples, got ${positionsM.length} numbers`);
  }
  const n = positionsM.length / 3;
  const leads = new Float64Array(n);
  elementLeadsS(leads, positionsM, azimuthDeg, elevationDeg, speedMps);
  const v = new Float64Array(2 * n);
  steeringFromLeads(v, leads, frequencyHz, n);
  return v;
}
