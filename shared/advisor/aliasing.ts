/**
 * Spatial aliasing check (common practice, DOMAIN.md §5): no grating lobe enters visible space
 * while the largest element spacing d ≤ λ/2 at the top processed frequency, or
 * d ≤ λ/(1 + |sin θ_max|) when looks stay within ±θ_max of broadside.
 */

export interface AliasingCheck {
  /** Largest spacing between neighbouring elements (metres; nearest-neighbour maximum). */
  maxSpacingM: number;
  /** Highest frequency free of grating lobes for the scan sector, Hz. */
  maxFrequencyHz: number;
  /** True when the top processed frequency exceeds it. */
  aliased: boolean;
}

/**
 * positionsM as [x,y,z,…]; speed in m/s; sector half-width in degrees (90 = full scan).
 * "Spacing" is the largest nearest-neighbour distance, the one that sets grating lobes for a
 * regular array (for irregular arrays this is a screening check only).
 */
export function checkAliasing(positionsM: ArrayLike<number>, speedMps: number, topFrequencyHz: number, sectorHalfWidthDeg = 90): AliasingCheck {
  const n = positionsM.length / 3;
  if (n < 2 || !Number.isInteger(n)) throw new RangeError('aliasing check needs at least two elements given as [x, y, z] triples');
  if (!(speedMps > 0)) throw new RangeError(`propagation speed must be positive, got ${speedMps}`);
  if (!(sectorHalfWidthDeg >= 0 && sectorHalfWidthDeg <= 90)) throw new RangeError(`scan sector half-width must be 0…90°, got ${sectorHalfWidthDeg}`);
  let maxSpacing = 0;
  for (let i = 0; i < n; i++) {
    let nearest = Infinity;
    for (let j = 0; j < n; j++) {
      if (i === j) continue;
      const dx = positionsM[3 * i] - positionsM[3 * j];
      const dy = positionsM[3 * i + 1] - positionsM[3 * j + 1];
      const dz = positionsM[3 * i + 2] - positionsM[3 * j + 2];
      nearest = Math.min(nearest, Math.hypot(dx, dy, dz));
    }
    maxSpacing = Math.max(maxSpacing, nearest);
  }
  if (!(maxSpacing > 0)) throw new RangeError('two elements share one position: every element needs its own place');
  const sinMax = Math.abs(Math.sin((sectorHalfWidthDeg * Math.PI) / 180));
  // d ≤ λ/(1+|sin θmax|) ⇔ f ≤ c/(d·(1+|sin θmax|)); θmax = 90° gives c/(2d).
  const maxFrequencyHz = speedMps / (maxSpacing * (1 + sinMax));
  return { maxSpacingM: maxSpacing, maxFrequencyHz, aliased: topFrequencyHz > maxFrequencyHz };
}
