/**
 * Version of the signal and geometry conventions (README "Conventions").
 * Every export (CSV header comment, run.json) names it, so a reader of an old result
 * knows which angle, phase-sign and time-span rules produced it. Bump it whenever any
 * convention changes, and say what changed in the README.
 */
export const CONVENTIONS_VERSION = '1';
