/**
 * Files and a real chunked-upload client for the upload, recording and archive tests: WAV files
 * written block by block (any size, bounded memory) and an uploader that speaks the same HTTP
 * API as the browser (session, multipart chunks with sha256, complete).
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import type { UploadSession } from '../../../shared/api/uploads.js';
import type { TestClient } from './test-server.js';

/** A 16-bit PCM WAV header (RIFF/WAVE, fmt PCM, data) for `dataBytes` of samples. */
export function wavHeader(channels: number, sampleRate: number, dataBytes: number): Buffer {
  const h = Buffer.alloc(44);
  h.write('RIFF', 0, 'latin1');
  h.writeUInt32LE(36 + dataBytes, 4);
  h.write('WAVE', 8, 'latin1');
  h.write('fmt ', 12, 'latin1');
  h.writeUInt32LE(16, 16);
  h.writeUInt16LE(1, 20);
  h.writeUInt16LE(channels, 22);
  h.writeUInt32LE(sampleRate, 24);
  h.writeUInt32LE(sampleRate * channels * 2, 28);
  h.writeUInt16LE(channels * 2, 32);
  h.writeUInt16LE(16, 34);
  h.write('data', 36, 'latin1');
  h.writeUInt32LE(dataBytes, 40);
  return h;
}

/**
 * Writes a 16-bit WAV whose sample (channel c, frame i) is sample(c, i) in full-scale units
 * (clamped to [-1, 1)), block by block.
 */
export async function writeWav(file: string, channels: number, sampleRate: number, frames: number, sample: (c: number, i: number) => number): Promise<void> {
  const out = fs.createWriteStream(file);
  const write = (b: Buffer) => new Promise<void>((res, rej) => (out.write(b, (e) => (e ? rej(e) : res()))));
  await write(wavHeader(channels, sampleRate, frames * channels * 2));
  const block = 8192;
  for (let f0 = 0; f0 < frames; f0 += block) {
    const n = Math.min(block, frames - f0);
    const buf = Buffer.alloc(n * channels * 2);
    for (let i = 0; i < n; i++) {
      for (let c = 0; c < channels; c++) {
        const v = Math.max(-32768, Math.min(32767, Math.round(sample(c, f0 + i) * 32768)));
        buf.writeInt16LE(v, (i * channels + c) * 2);
      }
    }
    await write(buf);
  }
  await new Promise<void>((res, rej) => out.end((e?: Error | null) => (e ? rej(e) : res())));
}

/**
 * A valid 16-channel, 16-bit, 48 kHz WAV of about `bytes` bytes, quickly: a pseudo-random
 * block varied per write (the upload tests care about bytes and hashes, not the signal).
 */
export async function writeLargeWav(file: string, bytes: number): Promise<void> {
  const channels = 16;
  const frameBytes = channels * 2;
  const dataBytes = Math.floor((bytes - 44) / frameBytes) * frameBytes;
  const fh = await fsp.open(file, 'w');
  try {
    await fh.write(wavHeader(channels, 48000, dataBytes), 0, 44, 0);
    const block = Buffer.alloc(4 * 1024 * 1024);
    let seed = 12345;
    for (let i = 0; i < block.length; i += 4) {
      seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
      block.writeUInt32LE(seed & 0x3fff3fff, i); // keeps samples well inside full scale
    }
    let pos = 0;
    while (pos < dataBytes) {
      const n = Math.min(block.length, dataBytes - pos);
      block.writeUInt32LE(pos >>> 0, 0); // every block differs, so misplaced chunks change the hash
      await fh.write(block, 0, n, 44 + pos);
      pos += n;
    }
  } finally {
    await fh.close();
  }
}

export async function sha256File(file: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const piece of fs.createReadStream(file, { highWaterMark: 4 * 1024 * 1024 })) hash.update(piece as Buffer);
  return hash.digest('hex');
}

export async function readRange(file: string, start: number, length: number): Promise<Buffer> {
  const fh = await fsp.open(file, 'r');
  try {
    const buf = Buffer.alloc(length);
    await fh.read(buf, 0, length, start);
    return buf;
  } finally {
    await fh.close();
  }
}

/** Sends one chunk as the browser does; `corrupt` flips a byte after hashing. */
export async function sendChunk(client: TestClient, session: UploadSession, file: string, index: number, opts: { corrupt?: boolean } = {}): Promise<Response> {
  const start = index * session.chunkBytes;
  const length = Math.min(session.chunkBytes, session.sizeBytes - start);
  const bytes = await readRange(file, start, length);
  const sha = createHash('sha256').update(bytes).digest('hex');
  if (opts.corrupt) bytes[Math.floor(length / 2)] ^= 0xff;
  const form = new FormData();
  form.append('sha256', sha);
  form.append('chunk', new Blob([bytes]), 'chunk');
  return client.fetch(`/api/uploads/${session.id}/chunks/${index}`, { method: 'POST', body: form });
}

/** Opens a session for `file`; throws with the server's message on refusal. */
export async function openSession(client: TestClient, file: string, body: Record<string, unknown>): Promise<UploadSession> {
  const res = await client.post('/api/uploads', body);
  const text = await res.text();
  if (res.status !== 201) throw new Error(`POST /api/uploads ${res.status}: ${text}`);
  return JSON.parse(text) as UploadSession;
}

/**
 * Sends the chunks not yet held, `inFlight` at a time (as the browser does), then completes.
 * `stopAfter` sends only that many chunks (to simulate an interrupted upload).
 */
export async function sendMissingChunks(client: TestClient, session: UploadSession, file: string, inFlight = 3, stopAfter = Infinity): Promise<number> {
  const held = new Set(session.received);
  const todo = Array.from({ length: session.chunkCount }, (_, i) => i).filter((i) => !held.has(i)).slice(0, stopAfter === Infinity ? undefined : stopAfter);
  let next = 0;
  const worker = async () => {
    while (next < todo.length) {
      const index = todo[next++];
      const res = await sendChunk(client, session, file, index);
      if (res.status !== 200) throw new Error(`chunk ${index}: ${res.status} ${await res.text()}`);
    }
  };
  await Promise.all(Array.from({ length: inFlight }, worker));
  return todo.length;
}

/** Polls a recording until it leaves 'inspecting'. */
export async function waitInspected(client: TestClient, id: number, timeoutMs = 60_000): Promise<Record<string, unknown> & { state: string }> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const rec = await client.getJson<Record<string, unknown> & { state: string }>(`/api/recordings/${id}`);
    if (rec.state !== 'inspecting') return rec;
    if (Date.now() > until) throw new Error(`recording ${id} still inspecting after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 150));
  }
}
