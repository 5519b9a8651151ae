/**
 * npm run samples -- --out DIR [--minutes M | --seconds S] [--channels N] [--spacing 0.5]
 *   [--rate 8000] [--format wav|rf64|sigmf|raw] [--bits 16|24|32|f32] [--complex --center HZ]
 *   [--planar] [--clip] [--dead-channel K] [--seed N] [--name BASE]
 *
 * Writes an invented "Gannet Ledge transit" recording, its array.json and scenario.json (truth).
 */
import { parseArgs } from 'node:util';
import { generateScenario } from './scenario/generate-scenario.js';
import type { OutputFormat } from './writers/recording-writer.js';
import type { WritableEncoding } from './writers/sample-encoder.js';

const USAGE = `Usage: npm run samples -- --out DIR [--minutes M | --seconds S] [--channels N] [--spacing M]
  [--rate HZ] [--format wav|rf64|sigmf|raw] [--bits 16|24|32|f32] [--complex --center HZ]
  [--planar] [--clip] [--dead-channel K] [--seed N] [--name BASE]`;

function fail(message: string): never {
  console.error(`samples: ${message}\n${USAGE}`);
  process.exit(2);
}

function num(v: string | undefined, name: string, fallback: number): number {
  if (v === undefined) return fallback;
  const x = Number(v);
  if (!Number.isFinite(x)) fail(`--${name} must be a number, got "${v}"`);
  return x;
}

let args;
try {
  args = parseArgs({
    options: {
      out: { type: 'string' },
      minutes: { type: 'string' },
      seconds: { type: 'string' },
      channels: { type: 'string' },
      spacing: { type: 'string' },
      rate: { type: 'string' },
      format: { type: 'string' },
      bits: { type: 'string' },
      complex: { type: 'boolean' },
      center: { type: 'string' },
      planar: { type: 'boolean' },
      clip: { type: 'boolean' },
      'dead-channel': { type: 'string' },
      seed: { type: 'string' },
      name: { type: 'string' },
      help: { type: 'boolean' },
    },
    strict: true,
  }).values;
} catch (e) {
  fail((e as Error).message);
}
if (args.help) {
  console.log(USAGE);
  process.exit(0);
}
if (!args.out) fail('--out DIR is required');
const format = (args.format ?? 'wav') as OutputFormat;
if (!['wav', 'rf64', 'sigmf', 'raw'].includes(format)) fail(`--format must be wav, rf64, sigmf or raw, got "${args.format}"`);
const bitsMap: Record<string, WritableEncoding> = { '16': 'i16', '24': 'i24', '32': 'i32', f32: 'f32', float: 'f32' };
const encoding = bitsMap[args.bits ?? '16'];
if (!encoding) fail(`--bits must be 16, 24, 32 or f32, got "${args.bits}"`);
const complex = args.complex ?? false;
const rate = num(args.rate, 'rate', complex ? 2000 : 8000);
const durationS = args.seconds !== undefined ? num(args.seconds, 'seconds', 0) : num(args.minutes, 'minutes', 1) * 60;
const channels = num(args.channels, 'channels', 32);
const started = Date.now();
let lastPrint = 0;
try {
  const result = generateScenario({
    outDir: args.out,
    baseName: args.name,
    durationS,
    channels,
    spacingM: num(args.spacing, 'spacing', 0.5),
    sampleRate: rate,
    format,
    encoding,
    complex,
    centerFrequencyHz: complex ? num(args.center, 'center', 750) : undefined,
    layout: args.planar ? 'planar' : 'interleaved',
    clip: args.clip ?? false,
    deadChannel: args['dead-channel'] !== undefined ? num(args['dead-channel'], 'dead-channel', 0) : null,
    seed: args.seed !== undefined ? num(args.seed, 'seed', 0) : undefined,
    onProgress: (done, total) => {
      const now = Date.now();
      if (now - lastPrint < 1000 && done < total) return;
      lastPrint = now;
      const rateMs = (done * channels) / Math.max(1, now - started) / 1000;
      process.stderr.write(`\rsamples: ${((100 * done) / total).toFixed(1)}% (${(done / rate).toFixed(1)} of ${(total / rate).toFixed(1)} s), ${rateMs.toFixed(1)} M samples/s   `);
    },
  });
  const secs = (Date.now() - started) / 1000;
  process.stderr.write('\n');
  console.log(`Wrote ${result.format.toUpperCase()} recording, ${result.frames} frames × ${channels} channels in ${secs.toFixed(1)} s (${((result.frames * channels) / secs / 1e6).toFixed(1)} M samples/s):`);
  for (const f of result.files) console.log(`  ${f}`);
  if (result.clippedValues > 0) console.log(`  ${result.clippedValues} values clipped at full scale`);
} catch (e) {
  process.stderr.write('\n');
  fail((e as Error).message);
}
