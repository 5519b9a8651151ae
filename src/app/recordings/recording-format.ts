/** Display helpers for recording figures (sizes, durations, levels). */
export function formatSize(bytes: number): string {
  const units = ['B', 'KiB', 'MiB', 'GiB', 'TiB'];
  let v = bytes;
  let u = 0;
  while (v >= 1024 && u < units.length - 1) {
    v /= 1024;
    u++;
  }
  return `${u ? v.toFixed(v >= 100 ? 0 : 1) : v} ${units[u]}`;
}

export function formatDuration(s: number | null): string {
  if (s === null) return '–';
  if (s < 60) return `${s.toFixed(1)} s`;
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const sec = Math.round(s % 60);
  return h ? `${h} h ${m} min` : `${m} min ${sec} s`;
}

/** Level re full scale in dBFS; "−∞" for silence. */
export function dbfs(x: number): string {
  return x > 0 ? `${(20 * Math.log10(x)).toFixed(1)} dBFS` : '−∞ dBFS';
}

export function formatEta(seconds: number | null): string {
  if (seconds === null || !Number.isFinite(seconds)) return '';
  return seconds < 90 ? `${Math.ceil(seconds)} s left` : `${Math.ceil(seconds / 60)} min left`;
}
