/**
 * Scenario generator: the phase each element records must match the true plane-wave delay under
 * CONVENTIONS.md (element n records s(t + τ_n), τ_n = p_n·u/c; with X[k] = Σ x[n]e^{−j2πkn/N}
 * the bin ratio X_n/X_0 equals v_n/v_0, v_n = exp(+j2πfτ_n)). Phases come from a direct DFT of
 * the samples read back through the frame source, not from the generator's own code.
 */
import { expect } from 'chai';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { generateScenario } from '../../samples/scenario/generate-scenario.js';
import type { ScenarioSource } from '../../samples/scenario/gannet-ledge.js';
import { openFrameSource } from '../../worker/io/open-frame-source.js';
import { readRecordingDescription } from '../../worker/io/read-recording-description.js';

/** Direct DFT of samples [start, start+len) at bin k (complex input when `complex`). */
function dftBin(x: Float64Array, start: number, len: number, k: number, complex: boolean): [number, number] {
  let re = 0;
  let im = 0;
  for (let n = 0; n < len; n++) {
    const a = (-2 * Math.PI * k * n) / len;
    const c = Math.cos(a);
    const s = Math.sin(a);
    const xr = complex ? x[2 * (start + n)] : x[start + n];
    const xi = complex ? x[2 * (start + n) + 1] : 0;
    re += xr * c - xi * s;
    im += xr * s + xi * c;
  }
  return [re, im];
}

const ratio = (a: [number, number], b: [number, number]): [number, number] => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};

async function readAll(dataFile: string, format: 'wav' | 'sigmf', sidecar?: string): Promise<{ x: Float64Array[]; frames: number }> {
  const d = await readRecordingDescription(format, dataFile, sidecar ? { path: sidecar } : undefined);
  const src = await openFrameSource(dataFile, d);
  const x = Array.from({ length: src.channels }, () => new Float64Array(d.frames * (d.complex ? 2 : 1)));
  await src.read(0, d.frames, x);
  await src.close();
  return { x, frames: d.frames };
}

describe('scenario generator: plane-wave phases match the true delays', () => {
  let dir: string;
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'ns-gen-'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  // DOMAIN.md §1 check [C]: N = 4 along x, d = 0.5 m, c = 1500 m/s, f = 1500 Hz, az = 30°, el = 0
  // gives v = [1, j, −1, −j].
  const expectedV: Array<[number, number]> = [[1, 0], [0, 1], [-1, 0], [0, -1]];
  const tone: ScenarioSource[] = [{ kind: 'tonal', name: 'check tone', frequencyHz: 1500, amplitude: 0.5, bearingDeg: 30, elevationDeg: 0, phaseRad: 0.4 }];

  it('real float WAV: X_n/X_0 at 1500 Hz equals [1, j, −1, −j]', async () => {
    const r = generateScenario({ outDir: join(dir, 'real'), durationS: 1, channels: 4, spacingM: 0.5, sampleRate: 8000, format: 'wav', encoding: 'f32', sources: tone });
    const { x } = await readAll(r.dataFile, 'wav');
    const x0 = dftBin(x[0], 0, 8000, 1500, false);
    for (let n = 0; n < 4; n++) {
      const q = ratio(dftBin(x[n], 0, 8000, 1500, false), x0);
      expect(q[0]).to.be.closeTo(expectedV[n][0], 2e-3);
      expect(q[1]).to.be.closeTo(expectedV[n][1], 2e-3);
    }
  });

  it('complex baseband SigMF: the same ratio at the physical frequency (f_c = 1400 Hz, bin at +100 Hz)', async () => {
    const r = generateScenario({ outDir: join(dir, 'cplx'), durationS: 1, channels: 4, spacingM: 0.5, sampleRate: 400, format: 'sigmf', encoding: 'f32', complex: true, centerFrequencyHz: 1400, sources: tone });
    const { x } = await readAll(r.dataFile, 'sigmf', r.dataFile.replace('.sigmf-data', '.sigmf-meta'));
    const x0 = dftBin(x[0], 0, 400, 100, true);
    for (let n = 0; n < 4; n++) {
      const q = ratio(dftBin(x[n], 0, 400, 100, true), x0);
      expect(q[0]).to.be.closeTo(expectedV[n][0], 2e-3);
      expect(q[1]).to.be.closeTo(expectedV[n][1], 2e-3);
    }
  });

  it('broadband source: cross-spectrum phase at 800 Hz equals 2πf(τ_n − τ_0) (windowed-sinc delay)', async () => {
    const bearing = -40;
    const band: ScenarioSource[] = [{ kind: 'broadband', name: 'check band', bandHz: [300, 1300], rms: 0.3, bearingDeg: bearing, elevationDeg: 0 }];
    const r = generateScenario({ outDir: join(dir, 'bb'), durationS: 4, channels: 4, spacingM: 0.5, sampleRate: 8000, format: 'wav', encoding: 'f32', sources: band });
    const { x, frames } = await readAll(r.dataFile, 'wav');
    const seg = 400; // 20 Hz bins: 800 Hz is bin 40
    for (let n = 1; n < 4; n++) {
      let sr = 0;
      let si = 0;
      for (let s = 0; s + seg <= frames; s += seg) {
        const a = dftBin(x[n], s, seg, 40, false);
        const b = dftBin(x[0], s, seg, 40, false);
        sr += a[0] * b[0] + a[1] * b[1];
        si += a[1] * b[0] - a[0] * b[1];
      }
      const tau = (n * 0.5 * Math.sin((bearing * Math.PI) / 180)) / 1500;
      const want = 2 * Math.PI * 800 * tau;
      const got = Math.atan2(si, sr);
      const diff = Math.atan2(Math.sin(got - want), Math.cos(got - want));
      expect(Math.abs(diff), `element ${n}`).to.be.below(0.01);
    }
  });
});
