import { EventEmitter } from 'node:events';
import type { JobDto, JobState } from '../../shared/api/jobs.js';

/**
 * In-process events of the queue, a typed map. The live-updates channel fans these out over
 * WebSocket; the node listens to `job:submitted` (wake the claim loop), `job:cancel-requested`
 * and `node:drain-changed` (act at once instead of at the next poll).
 *
 * Only changes made by this process are seen here; on PostgreSQL with headless nodes, the
 * server's node also publishes `job:progress`/`job:state` for jobs run elsewhere by watching
 * the jobs table (see remote-job-watcher.ts).
 */
export interface JobStateEvent {
  jobId: number;
  state: JobState;
  previousState: JobState | null;
  job: JobDto;
}

export interface JobProgressEvent {
  jobId: number;
  ownerId: number;
  windowsDone: number;
  totalWindows: number;
  checkpointWindow: number;
  windowsPerSecond: number | null;
  etaSeconds: number | null;
  nodeId: string | null;
  at: string;
}

export interface NodeHeartbeatEvent {
  nodeId: string;
  at: string;
  draining: boolean;
  currentJobIds: number[];
  windowsPerSecond: number;
  children: { pid: number; busy: boolean; task?: string; lastHeartbeatAt: string }[];
}

export interface QueueEventMap {
  'job:state': [JobStateEvent];
  'job:progress': [JobProgressEvent];
  'node:heartbeat': [NodeHeartbeatEvent];
  'job:submitted': [{ jobId: number }];
  'job:cancel-requested': [{ jobId: number }];
  'node:drain-changed': [{ nodeId: string; draining: boolean }];
  'queue:paused-changed': [{ paused: boolean }];
}

export type QueueEvents = EventEmitter<QueueEventMap>;

export function createQueueEvents(): QueueEvents {
  const e = new EventEmitter<QueueEventMap>();
  e.setMaxListeners(1000); // one per watching socket is normal
  return e;
}
