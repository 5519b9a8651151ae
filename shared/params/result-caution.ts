/**
 * The caution every result carries (run.json, CSV comment lines, result pages). Bearings,
 * powers and SINR estimates from adaptive beamforming can mislead: steering mismatch, spatial
 * aliasing, too few snapshots, self-nulling or a wrong sound speed all produce confident-looking
 * numbers. Where they could feed a navigation or safety decision, people must know they are an
 * analysis aid. Plain ASCII so every CSV reader shows it intact.
 */
export const RESULTS_CAUTION =
  'Analysis aid only: bearings, powers and SINR estimates depend on the array model, sound speed and ' +
  'snapshot support and can be wrong. Have a qualified person review them before they inform any ' +
  'navigation or safety decision.';
