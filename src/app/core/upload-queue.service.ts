import { HttpClient, HttpContext, HttpErrorResponse } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { UploadSession } from '../../../shared/api/uploads';
import { CHUNK_FILE_FIELD, CHUNK_SHA_FIELD, chunkRange } from '../../../shared/api/uploads';
import type { CheckedUpload } from './upload-header-check';
import { CALLER_HANDLES_ERRORS } from './http-context';

/** The upload list shows each failure itself. */
const HTTP_SILENT = () => new HttpContext().set(CALLER_HANDLES_ERRORS, true);

/** Chunks in flight per file (issue 4: 2–4). */
const IN_FLIGHT = 3;
const MAX_ATTEMPTS = 6;
const RESUME_KEY = 'nullsmith.uploads';

export type UploadItemState = 'queued' | 'sending' | 'finishing' | 'done' | 'failed' | 'cancelled';

export interface UploadItem {
  key: string;
  name: string;
  summary: string;
  sizeBytes: number;
  sentBytes: number;
  /** Bytes per second, smoothed. */
  rate: number;
  etaSeconds: number | null;
  state: UploadItemState;
  message: string;
  recordingId: number | null;
}

/**
 * Chunked, resumable uploads from the browser. Each file gets a server session; chunks go as
 * multipart with their sha256, IN_FLIGHT at a time, retried with exponential backoff. The
 * session id is remembered per file (name, size, modified time) in localStorage, so after a
 * reload or a lost network picking the same file asks the server which chunks it holds and
 * sends only the rest.
 */
@Injectable({ providedIn: 'root' })
export class UploadQueueService {
  private readonly http = inject(HttpClient);
  private readonly itemsState = signal<UploadItem[]>([]);
  private readonly cancels = new Map<string, AbortController>();

  readonly items = this.itemsState.asReadonly();
  readonly active = computed(() => this.itemsState().some((i) => i.state === 'sending' || i.state === 'finishing' || i.state === 'queued'));
  /** Bumped when an upload became a recording (pages reload their lists). */
  readonly finished = signal(0);

  enqueue(files: CheckedUpload[]): void {
    for (const f of files) {
      const key = fileKey(f.data);
      if (this.itemsState().some((i) => i.key === key && (i.state === 'sending' || i.state === 'queued'))) continue;
      this.upsert({ key, name: f.data.name, summary: f.summary, sizeBytes: f.data.size, sentBytes: 0, rate: 0, etaSeconds: null, state: 'queued', message: 'waiting', recordingId: null });
      void this.run(key, f);
    }
  }

  cancel(key: string): void {
    this.cancels.get(key)?.abort();
    const sessionId = readResume()[key];
    if (sessionId) void firstValueFrom(this.http.delete(`/api/uploads/${sessionId}`, { context: HTTP_SILENT() })).catch(() => undefined);
    forgetResume(key);
    this.patch(key, { state: 'cancelled', message: 'cancelled; the partial file was removed', etaSeconds: null });
  }

  clearFinished(): void {
    this.itemsState.update((list) => list.filter((i) => i.state === 'sending' || i.state === 'queued' || i.state === 'finishing'));
  }

  private async run(key: string, f: CheckedUpload): Promise<void> {
    const abort = new AbortController();
    this.cancels.set(key, abort);
    try {
      const session = await this.openOrResume(key, f);
      const held = new Set(session.received);
      let sent = session.receivedBytes;
      this.patch(key, { state: 'sending', sentBytes: sent, message: held.size ? `resuming: ${held.size} of ${session.chunkCount} chunks already on the server` : 'sending' });
      const todo = Array.from({ length: session.chunkCount }, (_, i) => i).filter((i) => !held.has(i));
      const started = performance.now();
      const sentAtStart = sent;
      let next = 0;
      const worker = async () => {
        while (next < todo.length) {
          if (abort.signal.aborted) return;
          const index = todo[next++];
          const { start, length } = chunkRange(index, session.chunkBytes, session.sizeBytes);
          await this.sendChunk(session.id, index, f.data.slice(start, start + length), abort.signal);
          sent += length;
          const secs = (performance.now() - started) / 1000;
          const rate = secs > 0 ? (sent - sentAtStart) / secs : 0;
          this.patch(key, { sentBytes: sent, rate, etaSeconds: rate > 0 ? (session.sizeBytes - sent) / rate : null });
        }
      };
      await Promise.all(Array.from({ length: IN_FLIGHT }, worker));
      if (abort.signal.aborted) return;
      this.patch(key, { state: 'finishing', message: 'checking the whole file on the server', etaSeconds: null });
      const done = await firstValueFrom(this.http.post<{ recordingId: number }>(`/api/uploads/${session.id}/complete`, {}, { context: HTTP_SILENT() }));
      forgetResume(key);
      this.patch(key, { state: 'done', recordingId: done.recordingId, message: 'uploaded; inspection runs now' });
      this.finished.update((n) => n + 1);
    } catch (err) {
      if (abort.signal.aborted) return;
      this.patch(key, { state: 'failed', message: describe(err), etaSeconds: null });
    } finally {
      this.cancels.delete(key);
    }
  }

  private async openOrResume(key: string, f: CheckedUpload): Promise<UploadSession> {
    const known = readResume()[key];
    if (known) {
      try {
        const s = await firstValueFrom(this.http.get<UploadSession>(`/api/uploads/${known}`, { context: HTTP_SILENT() }));
        if (s.state === 'receiving' && s.sizeBytes === f.data.size) return s;
      } catch {
        // gone (cancelled or cleaned up): start afresh
      }
      forgetResume(key);
    }
    const s = await firstValueFrom(
      this.http.post<UploadSession>(
        '/api/uploads',
        { name: f.data.name, sizeBytes: f.data.size, format: f.format, sidecar: f.sidecar?.text, sidecarName: f.sidecar?.name },
        { context: HTTP_SILENT() },
      ),
    );
    rememberResume(key, s.id);
    return s;
  }

  /** One chunk with retry: network errors and 5xx back off 1, 2, 4 … s; 4xx other than a checksum mismatch stop at once. */
  private async sendChunk(sessionId: string, index: number, blob: Blob, signal: AbortSignal): Promise<void> {
    const bytes = await blob.arrayBuffer();
    const sha = hex(await crypto.subtle.digest('SHA-256', bytes));
    for (let attempt = 1; ; attempt++) {
      const form = new FormData();
      form.append(CHUNK_SHA_FIELD, sha);
      form.append(CHUNK_FILE_FIELD, new Blob([bytes]), 'chunk');
      try {
        await firstValueFrom(this.http.post(`/api/uploads/${sessionId}/chunks/${index}`, form, { context: HTTP_SILENT() }));
        return;
      } catch (err) {
        const status = err instanceof HttpErrorResponse ? err.status : 0;
        const retryable = status === 0 || status >= 500 || status === 422 || status === 408 || status === 429;
        if (!retryable || attempt >= MAX_ATTEMPTS || signal.aborted) throw err;
        await new Promise((r) => setTimeout(r, Math.min(30_000, 1000 * 2 ** (attempt - 1)) * (0.5 + Math.random() / 2)));
      }
    }
  }

  private upsert(item: UploadItem): void {
    this.itemsState.update((list) => [item, ...list.filter((i) => i.key !== item.key)]);
  }

  private patch(key: string, p: Partial<UploadItem>): void {
    this.itemsState.update((list) => list.map((i) => (i.key === key ? { ...i, ...p } : i)));
  }
}

function fileKey(f: File): string {
  return `${f.name}|${f.size}|${f.lastModified}`;
}

function readResume(): Record<string, string> {
  try {
    return JSON.parse(localStorage.getItem(RESUME_KEY) ?? '{}') as Record<string, string>;
  } catch {
    return {};
  }
}
function rememberResume(key: string, id: string): void {
  localStorage.setItem(RESUME_KEY, JSON.stringify({ ...readResume(), [key]: id }));
}
function forgetResume(key: string): void {
  const m = readResume();
  delete m[key];
  localStorage.setItem(RESUME_KEY, JSON.stringify(m));
}

function hex(buf: ArrayBuffer): string {
  return [...new Uint8Array(buf)].map((b) => b.toString(16).padStart(2, '0')).join('');
}

function describe(err: unknown): string {
  if (err instanceof HttpErrorResponse) {
    const body = err.error as { error?: { message?: string } } | null;
    return body?.error?.message ?? (err.status === 0 ? 'The server cannot be reached; pick the file again to resume once it is back.' : `${err.status} ${err.statusText}`);
  }
  return err instanceof Error ? err.message : String(err);
}
