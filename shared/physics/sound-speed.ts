/**
 * Propagation speeds (CONVENTIONS.md "Geometry" presets) and the two sound-speed formulas the
 * array form offers. Pure, browser-safe.
 */

/** Preset speeds in m/s: sea water 1500, fresh water 1481 (20 °C), air 343 (20 °C), radio c₀ (exact). */
export const SPEED_PRESETS = {
  sea: 1500,
  fresh: 1481,
  air: 343,
  radio: 299_792_458,
} as const;

export type SpeedPreset = keyof typeof SPEED_PRESETS;

/** Validity of Mackenzie (1981): T 2…30 °C (some restatements allow −2), S 25…40 ‰, D 0…8000 m. */
export const MACKENZIE_RANGE = { tempC: [-2, 30], salinityPsu: [25, 40], depthM: [0, 8000] } as const;

/**
 * Speed of sound in sea water, Mackenzie (1981), "Nine-term equation for sound speed in the
 * oceans", JASA 70(3):807–812. Check value 1550.744 m/s at 25 °C, 35 ‰, 1000 m.
 * Throws RangeError outside the published validity range.
 */
export function mackenzieSoundSpeed(tempC: number, salinityPsu: number, depthM: number): number {
  const check = (name: string, value: number, [lo, hi]: readonly [number, number], unit: string): void => {
    if (!(value >= lo && value <= hi)) {
      throw new RangeError(`${name} ${value} ${unit} is outside the range of the Mackenzie (1981) equation (${lo} to ${hi} ${unit}): enter the speed directly instead`);
    }
  };
  check('temperature', tempC, MACKENZIE_RANGE.tempC, '°C');
  check('salinity', salinityPsu, MACKENZIE_RANGE.salinityPsu, '‰');
  check('depth', depthM, MACKENZIE_RANGE.depthM, 'm');
  const t = tempC;
  const s = salinityPsu - 35;
  const d = depthM;
  return (
    1448.96 + 4.591 * t - 5.304e-2 * t * t + 2.374e-4 * t * t * t + 1.34 * s + 1.63e-2 * d + 1.675e-7 * d * d - 1.025e-2 * t * s - 7.139e-13 * t * d * d * d
  );
}

/**
 * Speed of sound in dry air as an ideal gas (γ = 1.4): 331.3·√(1 + T/273.15) m/s
 * (331.30 at 0 °C, 343.21 at 20 °C). Humidity adds about 0.1–0.6 %.
 */
export function airSoundSpeed(tempC: number): number {
  if (!(tempC > -273.15) || !Number.isFinite(tempC)) {
    throw new RangeError(`air temperature ${tempC} °C is not physical: it must be above −273.15 °C`);
  }
  return 331.3 * Math.sqrt(1 + tempC / 273.15);
}
