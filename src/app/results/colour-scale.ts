/**
 * Nullsmith's heat-map colour scale "tidewater": from deep slate through sea green and sand to
 * a hot ember, perceptually ordered in lightness so bearing tracks read in greyscale too. Our
 * own stops; returns packed RGBA for ImageData.
 */
const STOPS: [number, [number, number, number]][] = [
  [0.0, [14, 22, 38]],
  [0.22, [23, 63, 95]],
  [0.45, [25, 118, 120]],
  [0.65, [122, 170, 110]],
  [0.82, [228, 196, 120]],
  [0.93, [236, 128, 58]],
  [1.0, [255, 236, 210]],
];

/** Colour of t ∈ [0, 1] (clamped) as [r, g, b]. */
export function tidewater(t: number): [number, number, number] {
  const x = Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0));
  for (let i = 1; i < STOPS.length; i++) {
    const [t1, c1] = STOPS[i];
    if (x <= t1) {
      const [t0, c0] = STOPS[i - 1];
      const u = (x - t0) / (t1 - t0);
      return [0, 1, 2].map((k) => Math.round(c0[k] + u * (c1[k] - c0[k]))) as [number, number, number];
    }
  }
  return STOPS[STOPS.length - 1][1];
}

/** A 256-entry lookup table for fast filling. */
export const TIDEWATER_LUT: Uint8ClampedArray = (() => {
  const lut = new Uint8ClampedArray(256 * 3);
  for (let i = 0; i < 256; i++) lut.set(tidewater(i / 255), i * 3);
  return lut;
})();
