/**
 * "Gannet Ledge transit": an invented survey scene for Nullsmith's demo data. A towed line
 * array along x (element 0 at x = 0) crosses a fishing ground and hears two ships' propeller
 * tones, a quiet tonal contact close to broadside, and a survey tender's broadband noise, over
 * independent sensor noise. Bearings follow CONVENTIONS.md (0° broadside, +90° endfire toward +x).
 * Names, levels and frequencies are made up.
 */
export interface TonalSource {
  kind: 'tonal';
  name: string;
  frequencyHz: number;
  /** Peak amplitude on every element, full scale = 1. */
  amplitude: number;
  bearingDeg: number;
  elevationDeg: number;
  phaseRad: number;
}

export interface BroadbandSource {
  kind: 'broadband';
  name: string;
  bandHz: [number, number];
  /** RMS on every element, full scale = 1 (complex: of |x|). */
  rms: number;
  bearingDeg: number;
  elevationDeg: number;
}

export type ScenarioSource = TonalSource | BroadbandSource;

export const GANNET_LEDGE_TITLE = 'Gannet Ledge transit';

export const GANNET_LEDGE_SOURCES: readonly ScenarioSource[] = [
  { kind: 'tonal', name: 'MV Corran Bell, blade-rate tone', frequencyHz: 118, amplitude: 0.04, bearingDeg: -38, elevationDeg: 0, phaseRad: 0.3 },
  { kind: 'tonal', name: 'MV Corran Bell, second harmonic', frequencyHz: 236, amplitude: 0.02, bearingDeg: -38, elevationDeg: 0, phaseRad: 1.1 },
  { kind: 'tonal', name: 'FV Ardnave, engine tone', frequencyHz: 355, amplitude: 0.03, bearingDeg: 21, elevationDeg: 0, phaseRad: -0.7 },
  { kind: 'tonal', name: 'Quiet contact near broadside', frequencyHz: 610, amplitude: 0.006, bearingDeg: -6, elevationDeg: 0, phaseRad: 2.0 },
  { kind: 'broadband', name: 'Survey tender Selkie, broadband', bandHz: [180, 1400], rms: 0.015, bearingDeg: 52, elevationDeg: 0 },
];

/** Independent sensor noise on every element, RMS re full scale (−40 dBFS). */
export const GANNET_LEDGE_SENSOR_NOISE_RMS = 0.01;

/** Overall gain applied with --clip so the loudest moments exceed full scale. */
export const GANNET_LEDGE_CLIP_GAIN = 14;
