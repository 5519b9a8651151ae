/**
 * Chooses the sliding-window covariance update (worker/dsp/covariance.ts SlidingCovariance):
 * ring of partial sums over gcd(K, H) snapshots versus incremental add-new/subtract-old.
 * N = 32, K = 64, one bin; µs per window for several window hops H.
 * Run: node --import tsx bench/dsp-sliding.ts
 */
import { accumulateOuterProducts, mirrorUpper, SlidingCovariance } from '../worker/dsp/covariance.js';

const N = 32;
const K = 64;
const TOTAL = 4096;
const snaps = Float64Array.from({ length: TOTAL * N * 2 }, (_, i) => Math.sin(i * 0.7311) + Math.cos(i * 0.173));

function perWindow(label: string, hop: number, body: () => number): void {
  body();
  const t0 = process.hrtime.bigint();
  const windows = body();
  const us = Number(process.hrtime.bigint() - t0) / 1e3 / windows;
  console.log(`H=${String(hop).padStart(2)} ${label.padEnd(28)} ${us.toFixed(1).padStart(7)} µs per window`);
}

for (const hop of [1, 4, 8, 16, 32]) {
  perWindow('partial sums (ring)', hop, () => {
    const s = new SlidingCovariance(1, N, K, hop);
    s.push(snaps.subarray(0, K * N * 2), K);
    s.current();
    let w = 1;
    for (let start = K; start + hop <= TOTAL; start += hop, w++) {
      s.push(snaps.subarray(start * N * 2, (start + hop) * N * 2), hop);
      s.current();
    }
    return w;
  });
  perWindow('add new / subtract old', hop, () => {
    const acc = new Float64Array(2 * N * N);
    const out = new Float64Array(2 * N * N);
    accumulateOuterProducts(acc, 0, snaps, 0, K, N, 1);
    let w = 1;
    for (let start = K; start + hop <= TOTAL; start += hop, w++) {
      accumulateOuterProducts(acc, 0, snaps, start * N * 2, hop, N, 1);
      accumulateOuterProducts(acc, 0, snaps, (start - K) * N * 2, hop, N, -1);
      for (let i = 0; i < acc.length; i++) out[i] = acc[i] / K;
      mirrorUpper(out, 0, N);
    }
    return w;
  });
}
