/**
 * A plane-wave tone-comb scene written as a 16-bit multichannel WAV, streamed chunk by chunk
 * (a 10-minute, 32-channel file never sits in memory). Each source is a comb of tones arriving
 * from one direction; element n receives s(t + τ_n) with τ_n = (p_n·u)/c (CONVENTIONS.md
 * "Geometry": a plane wave from u reaches element n earlier by τ_n), plus white Gaussian noise.
 * Because tones are delayed exactly (no interpolation filter), the true bearing is known to
 * machine precision: the oracle the runner tests check against.
 *
 * Used by the runner tests and the benchmark's fallback scene; invented scenario, no real data.
 */
import fs from 'node:fs/promises';
import type { ArrayGeometry } from '../shared/arrays/array-geometry.js';

export interface ToneSource {
  azimuthDeg: number;
  elevationDeg?: number;
  tonesHz: number[];
  /** Amplitude of each tone at each element (full scale = 1). */
  amplitude: number;
  /** Seconds during which the source is on; always on when absent. */
  onS?: { startS: number; endS: number };
}

export interface ToneCombScene {
  sampleRate: number;
  seconds: number;
  array: ArrayGeometry;
  sources: ToneSource[];
  /** Standard deviation of the white noise per element (full scale = 1). */
  noiseStd: number;
  seed: number;
}

/** Small seeded generator (mulberry32, common practice for reproducible JS test data) + Box–Muller normals. */
class Normals {
  private state: number;
  private spare: number | null = null;
  constructor(seed: number) {
    this.state = seed >>> 0;
  }
  private uniform(): number {
    let t = (this.state = (this.state + 0x6d2b79f5) >>> 0);
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }
  next(): number {
    if (this.spare !== null) {
      const s = this.spare;
      this.spare = null;
      return s;
    }
    const r = Math.sqrt(-2 * Math.log(1 - this.uniform()));
    const th = 2 * Math.PI * this.uniform();
    this.spare = r * Math.sin(th);
    return r * Math.cos(th);
  }
}

/** WAVE_FORMAT_EXTENSIBLE header for 16-bit PCM (Microsoft WAVEFORMATEXTENSIBLE; DOMAIN.md §4). */
function wavHeader(channels: number, sampleRate: number, frames: number): Buffer {
  const blockAlign = channels * 2;
  const dataBytes = frames * blockAlign;
  const h = Buffer.alloc(68);
  h.write('RIFF', 0, 'ascii');
  h.writeUInt32LE(60 + dataBytes, 4);
  h.write('WAVE', 8, 'ascii');
  h.write('fmt ', 12, 'ascii');
  h.writeUInt32LE(40, 16);
  h.writeUInt16LE(0xfffe, 20);
  h.writeUInt16LE(channels, 22);
  h.writeUInt32LE(sampleRate, 24);
  h.writeUInt32LE(sampleRate * blockAlign, 28);
  h.writeUInt16LE(blockAlign, 32);
  h.writeUInt16LE(16, 34);
  h.writeUInt16LE(22, 36); // cbSize
  h.writeUInt16LE(16, 38); // valid bits
  h.writeUInt32LE(0, 40); // channel mask: no speaker positions
  // SubFormat KSDATAFORMAT_SUBTYPE_PCM {00000001-0000-0010-8000-00AA00389B71}
  Buffer.from([0x01, 0x00, 0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71]).copy(h, 44);
  h.write('data', 60, 'ascii');
  h.writeUInt32LE(dataBytes, 64);
  return h;
}

/** Lead time τ_n = (p_n·u)/c of every active element for a direction. */
export function leadTimesS(array: ArrayGeometry, azimuthDeg: number, elevationDeg: number): number[] {
  const az = (azimuthDeg * Math.PI) / 180;
  const el = (elevationDeg * Math.PI) / 180;
  const u = [Math.sin(az) * Math.cos(el), Math.cos(az) * Math.cos(el), Math.sin(el)];
  return array.elements.filter((e) => !e.excluded).map((e) => (e.position[0] * u[0] + e.position[1] * u[1] + e.position[2] * u[2]) / array.speedOfSoundMps);
}

/**
 * Writes the scene to `path`. Channel c of the file feeds the element whose `channel` is c.
 * Returns the number of samples clipped at full scale (0 for a sensible scene).
 */
export async function writeToneCombWav(path: string, scene: ToneCombScene, onProgress?: (fraction: number) => void): Promise<{ frames: number; clipped: number }> {
  const { sampleRate: fs_, array } = scene;
  const frames = Math.round(scene.seconds * fs_);
  const channels = array.elements.length;
  const fh = await fs.open(path, 'w');
  let clipped = 0;
  try {
    await fh.write(wavHeader(channels, fs_, frames));
    const chunk = 8192;
    const buf = Buffer.alloc(chunk * channels * 2);
    const acc = new Float64Array(chunk);
    const noise = new Normals(scene.seed);
    const tones = scene.sources.flatMap((s, si) =>
      s.tonesHz.map((f, ti) => ({ s, f, phase0: 2 * Math.PI * (((si + 1) * 0.618034 + ti * 0.414214) % 1), leads: leadTimesS(array, s.azimuthDeg, s.elevationDeg ?? 0) })),
    );
    let pos = 64 + 4; // header length
    for (let t0 = 0; t0 < frames; t0 += chunk) {
      const n = Math.min(chunk, frames - t0);
      let active = 0;
      for (const el of array.elements) {
        if (el.excluded) continue;
        acc.fill(0, 0, n);
        for (const tone of tones) {
          const on = tone.s.onS;
          // Phasor recursion per chunk, re-anchored exactly at the chunk start (no drift).
          const w = (2 * Math.PI * tone.f) / fs_;
          const cr = Math.cos(w);
          const ci = Math.sin(w);
          const ph = 2 * Math.PI * tone.f * (t0 / fs_ + tone.leads[active]) + tone.phase0;
          let re = Math.cos(ph);
          let im = Math.sin(ph);
          for (let i = 0; i < n; i++) {
            if (!on || ((t0 + i) / fs_ >= on.startS && (t0 + i) / fs_ < on.endS)) acc[i] += tone.s.amplitude * re;
            const r2 = re * cr - im * ci;
            im = re * ci + im * cr;
            re = r2;
          }
        }
        const ch = el.channel;
        for (let i = 0; i < n; i++) {
          let v = Math.round((acc[i] + scene.noiseStd * noise.next()) * 32768);
          if (v > 32767 || v < -32768) {
            clipped++;
            v = Math.max(-32768, Math.min(32767, v));
          }
          buf.writeInt16LE(v, (i * channels + ch) * 2);
        }
        active++;
      }
      await fh.write(buf, 0, n * channels * 2, pos);
      pos += n * channels * 2;
      onProgress?.((t0 + n) / frames);
    }
  } finally {
    await fh.close();
  }
  return { frames, clipped };
}
