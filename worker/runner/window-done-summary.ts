/**
 * The light per-window facts sent with progress (live bearing–time view): broadband adaptive
 * power per beam in dB and the strongest beam. Plain numbers, so they cross IPC and JSON as is.
 */
import type { EngineSetup, WindowResult } from '../dsp/window-engine.types.js';

export interface WindowDoneSummary {
  window: number;
  tStartS: number;
  tEndS: number;
  /** 10·log10 of the broadband adaptive power per beam (null where not finite or ≤ 0). */
  broadbandPowerDb: (number | null)[];
  /** Broadband SINR per beam in dB (null where not estimated). */
  broadbandSinrDb: (number | null)[];
  peakBeam: number;
  peakAzimuthDeg: number;
  peakElevationDeg: number;
  /** Bins whose covariance was not positive definite (their outputs are NaN). */
  singularBins: number;
}

const db = (x: number): number | null => (x > 0 && Number.isFinite(x) ? 10 * Math.log10(x) : null);

export function summarizeWindow(window: number, span: { startS: number; endS: number }, setup: EngineSetup, r: WindowResult): WindowDoneSummary {
  const p = r.broadbandAdaptivePower;
  let peak = 0;
  for (let b = 1; b < p.length; b++) if (p[b] > p[peak] || !(p[peak] > 0)) peak = b;
  let singular = 0;
  for (let i = 0; i < r.notPositiveDefinite.length; i++) singular += r.notPositiveDefinite[i];
  return {
    window,
    tStartS: span.startS,
    tEndS: span.endS,
    broadbandPowerDb: Array.from(p, db),
    broadbandSinrDb: Array.from(r.broadbandSinr, db),
    peakBeam: peak,
    peakAzimuthDeg: setup.azimuthsDeg[peak],
    peakElevationDeg: setup.elevationsDeg[peak],
    singularBins: singular,
  };
}
