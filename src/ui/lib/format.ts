/** Number and time formatting shared by the screens. */

/** 0.9312 → "93.1 %". */
export function percent(fraction: number, digits = 1): string {
  if (!Number.isFinite(fraction)) return '–';
  return `${(fraction * 100).toFixed(digits)} %`;
}

/** Seconds as "42 s", "3 min 05 s" or "1 h 02 min"; unknown or infinite as "–". */
export function duration(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return '–';
  const s = Math.round(seconds);
  if (s < 60) return `${s} s`;
  const minutes = Math.floor(s / 60);
  if (minutes < 60) return `${minutes} min ${String(s % 60).padStart(2, '0')} s`;
  return `${Math.floor(minutes / 60)} h ${String(minutes % 60).padStart(2, '0')} min`;
}

/** 1234567 → "1,234,567" (fixed grouping, independent of the browser's locale). */
export function count(n: number): string {
  const digits = String(Math.round(n));
  return digits.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/** Progress figures for the run screen. */
export interface RunFigures {
  /** 0..1 */
  readonly fraction: number;
  /** Gradient evaluations per second. */
  readonly rate: number;
  /** Seconds left at the current rate (Infinity while unknown). */
  readonly secondsLeft: number;
}

/** Fraction done, rate and time left from a sweep's progress report. */
export function runFigures(done: number, total: number, rate: number): RunFigures {
  const fraction = total > 0 ? Math.min(1, Math.max(0, done / total)) : 0;
  const secondsLeft = rate > 0 ? Math.max(0, total - done) / rate : Number.POSITIVE_INFINITY;
  return { fraction, rate, secondsLeft };
}

/** Byte counts as "812 B", "14.2 kB", "3.1 MB". */
export function bytes(n: number): string {
  if (n < 1000) return `${n} B`;
  if (n < 1e6) return `${(n / 1000).toFixed(1)} kB`;
  return `${(n / 1e6).toFixed(1)} MB`;
}

/** A list of per-channel values as "0.485, 0.456, 0.406". */
export function channelList(values: readonly number[]): string {
  return values.map((v) => String(v)).join(', ');
}

/** Parse "0.485, 0.456, 0.406" (commas or spaces); null when a value is not a finite number. */
export function parseChannelList(text: string): number[] | null {
  const parts = text.split(/[\s,;]+/).filter((p) => p !== '');
  if (parts.length === 0) return null;
  const values = parts.map(Number);
  return values.every((v) => Number.isFinite(v)) ? values : null;
}
