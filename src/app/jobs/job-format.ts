import type { JobDto, JobState } from '../../../shared/api/jobs.js';

/** Words and icons of the job states, as the jobs table and results page show them. */
export const STATE_LOOK: Record<JobState, { label: string; icon: string }> = {
  queued: { label: 'Queued', icon: 'hourglass_empty' },
  scheduled: { label: 'Scheduled', icon: 'schedule' },
  running: { label: 'Running', icon: 'play_circle' },
  succeeded: { label: 'Succeeded', icon: 'check_circle' },
  failed: { label: 'Failed', icon: 'error' },
  cancelled: { label: 'Cancelled', icon: 'block' },
};

/** Percent of windows done (0–100), or null before the total is known. */
export function progressPercent(job: Pick<JobDto, 'windowsDone' | 'totalWindows' | 'state'>): number | null {
  if (job.state === 'succeeded') return 100;
  if (!job.totalWindows) return null;
  return Math.min(100, Math.floor((100 * job.windowsDone) / job.totalWindows));
}

/** "1 h 04 min", "3 min 20 s", "12 s". */
export function formatDuration(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return '–';
  if (seconds > 0 && seconds < 0.5) return '< 1 s';
  const s = Math.max(0, Math.round(seconds));
  if (s < 1) return '< 1 s';
  if (s < 60) return `${s} s`;
  if (s < 3600) return `${Math.floor(s / 60)} min ${String(s % 60).padStart(2, '0')} s`;
  return `${Math.floor(s / 3600)} h ${String(Math.floor((s % 3600) / 60)).padStart(2, '0')} min`;
}

/** Short UTC date-time for tables: "02 Dec 14:05". */
export function shortTime(iso: string | null): string {
  if (!iso) return '–';
  const d = new Date(iso);
  return d.toLocaleString('en-GB', { day: '2-digit', month: 'short', hour: '2-digit', minute: '2-digit', timeZone: 'UTC' });
}

/** Bytes as "12.4 MB". */
export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  const units = ['kB', 'MB', 'GB', 'TB'];
  let v = n / 1024;
  let u = 0;
  while (v >= 1024 && u < units.length - 1) {
    v /= 1024;
    u++;
  }
  return `${v.toFixed(v < 10 ? 1 : 0)} ${units[u]}`;
}
