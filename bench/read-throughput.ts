/**
 * node --import tsx bench/read-throughput.ts [--minutes 2] [--channels 32]
 *
 * Measures (1) the pure conversion kernel, 32-channel 16-bit interleaved → float64 planar,
 * from memory (target ≥ 100 M samples/s); (2) the whole FrameSource path from a file in the page
 * cache; (3) the scenario generator writing a WAV (target ≥ 5 M samples/s). Reports wall-clock
 * and CPU-time rates: on a shared machine the CPU-time rate is the fairer figure.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { generateScenario } from '../samples/scenario/generate-scenario.js';
import { openFrameSource } from '../worker/io/open-frame-source.js';
import { readRecordingDescription } from '../worker/io/read-recording-description.js';
import { SampleDecoder } from '../worker/io/sample-decoder.js';

const { values } = parseArgs({ options: { minutes: { type: 'string', default: '2' }, channels: { type: 'string', default: '32' } } });
const minutes = Number(values.minutes);
const channels = Number(values.channels);

function measure(label: string, samples: number, run: () => void | Promise<void>): Promise<void> {
  const t0 = performance.now();
  const c0 = process.cpuUsage();
  return Promise.resolve(run()).then(() => {
    const wall = (performance.now() - t0) / 1000;
    const cpu = process.cpuUsage(c0);
    const cpuS = (cpu.user + cpu.system) / 1e6;
    console.log(`${label.padEnd(44)} ${(samples / wall / 1e6).toFixed(1).padStart(7)} M samples/s wall  ${(samples / cpuS / 1e6).toFixed(1).padStart(7)} M samples/s CPU  (${wall.toFixed(2)} s wall, ${cpuS.toFixed(2)} s CPU)`);
  });
}

// (1) Kernel: 8 MiB of interleaved 16-bit samples, decoded tile by tile as the frame source does.
const bytes = 8 * 1024 * 1024;
const buf = Buffer.allocUnsafeSlow(bytes);
for (let i = 0; i < bytes; i++) buf[i] = (i * 2654435761) >>> 24;
const dec = new SampleDecoder(buf, 'i16', true);
const frames = bytes / 2 / channels;
const out = Array.from({ length: channels }, () => new Float64Array(frames));
const passes = 20;
const decodeAll = (): void => {
  for (let t = 0; t < frames; t += 1024) {
    const n = Math.min(1024, frames - t);
    for (let c = 0; c < channels; c++) dec.decodeRun(t * channels + c, channels, n, 1, out[c], t, 1);
  }
};
decodeAll();
await measure(`decode ${channels}-ch i16 → float64 (memory)`, passes * frames * channels, () => {
  for (let p = 0; p < passes; p++) decodeAll();
});

// (3) Generator, then (2) reading its output back.
const dir = mkdtempSync(join(tmpdir(), 'ns-bench-read-'));
try {
  const seconds = minutes * 60;
  let path = '';
  await measure(`generate ${minutes} min ${channels}-ch 8 kHz 16-bit WAV`, seconds * 8000 * channels, () => {
    path = generateScenario({ outDir: dir, durationS: seconds, channels, spacingM: 0.5, sampleRate: 8000, format: 'wav', encoding: 'i16' }).dataFile;
  });
  const d = await readRecordingDescription('wav', path);
  const src = await openFrameSource(path, d);
  const block = 65536;
  const o = Array.from({ length: channels }, () => new Float64Array(block));
  await measure('FrameSource read (file, page cache)', d.frames * channels, async () => {
    for (let s = 0; s < d.frames; s += block) await src.read(s, block, o);
  });
  await src.close();
  console.log(`peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB; load average ${(await import('node:os')).loadavg().map((x) => x.toFixed(1)).join(' ')}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
