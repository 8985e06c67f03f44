/** Display formats shared by pages and exports (framework-free: server and client components import it). */

/**
 * A claimed time as entrants type it (h:mm:ss.t): 1 h 2 min 3.4 s → "1:02:03.4". Only for claimed
 * (ranked) times, which count to the tenth; every other duration goes through formatDurationS.
 */
export function formatDurationMs(ms: number | null | undefined): string {
  if (ms == null || !Number.isFinite(ms) || ms < 0) return '—';
  const tenths = Math.round(ms / 100);
  const h = Math.floor(tenths / 36000);
  const m = Math.floor((tenths % 36000) / 600);
  const s = Math.floor((tenths % 600) / 10);
  const t = tenths % 10;
  return `${h}:${String(m).padStart(2, '0')}:${String(s).padStart(2, '0')}.${t}`;
}

const two = (n: number) => String(n).padStart(2, '0');

/**
 * Any other duration (estimates, differences, waiting times), in seconds, as the two largest units:
 * "45 s", "3 min 20 s", "1 h 02 min", "2 d 05 h". The smaller unit is rounded, so 3599.6 s reads
 * "1 h 00 min", not "59 min 60 s".
 */
export function formatDurationS(seconds: number | null | undefined): string {
  if (seconds == null || !Number.isFinite(seconds) || seconds < 0) return '—';
  const s = Math.round(seconds);
  if (s < 60) return `${s} s`;
  if (s < 3600) return `${Math.floor(s / 60)} min ${two(s % 60)} s`;
  const min = Math.round(s / 60);
  if (min < 24 * 60) return `${Math.floor(min / 60)} h ${two(min % 60)} min`;
  const h = Math.round(s / 3600);
  return `${Math.floor(h / 24)} d ${two(h % 24)} h`;
}

/** A figure with a fixed number of decimals and an optional unit: (31.46, 1, 'mm³/s') → "31.5 mm³/s"; missing → "—". */
export function formatNumber(value: number | null | undefined, digits: number, unit = ''): string {
  if (value == null || !Number.isFinite(value)) return '—';
  return `${value.toFixed(digits)}${unit ? ` ${unit}` : ''}`;
}

/**
 * One formatter per style and time zone, made once: building an Intl.DateTimeFormat costs far more
 * than using one (measured ~0.3 ms each; a standings page with 25 dates spent ~8 ms building them).
 */
const formatters = new Map<string, Intl.DateTimeFormat>();
function dateFormat(withTime: boolean, timeZone: string): Intl.DateTimeFormat {
  const key = `${withTime ? 't' : 'd'}|${timeZone}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', withTime ? { dateStyle: 'medium', timeStyle: 'short', timeZone } : { dateStyle: 'medium', timeZone });
    formatters.set(key, f);
  }
  return f;
}

export function formatDate(iso: string | Date | null | undefined, timeZone = 'UTC'): string {
  if (!iso) return '—';
  return dateFormat(false, timeZone).format(new Date(iso));
}

export function formatDateTime(iso: string | Date | null | undefined, timeZone = 'UTC'): string {
  if (!iso) return '—';
  return dateFormat(true, timeZone).format(new Date(iso)) + (timeZone === 'UTC' ? ' UTC' : '');
}

/**
 * A season's entry window in the season's own time zone, the zone named once at the end:
 * "1 Dec 2026, 18:00 – 12 Jan 2027, 18:00 (Europe/Berlin)"; `withTime: false` gives the dates only.
 */
export function formatSeasonWindow(opens: string | Date | null | undefined, closes: string | Date | null | undefined, timeZone = 'UTC', withTime = true): string {
  const one = (d: string | Date | null | undefined) =>
    d ? dateFormat(withTime, timeZone).format(new Date(d)) : '—';
  return `${one(opens)} – ${one(closes)} (${timeZone})`;
}

/** The standings pager's status line; a page past the end (an old or edited link) says so instead of "Page 99 of 1". */
export function formatPageStatus(page: number, pages: number, total: number, counted: (n: number) => string = (n) => `${n} ranked`): string {
  const last = Math.max(1, pages);
  if (page > last) return `Page ${page} does not exist: the last page is ${last} · ${counted(total)}`;
  return `Page ${page} of ${last} · ${counted(total)}`;
}

/** A file size as people read it: "812 bytes", "48.2 KB", "1.9 MB" (1 KB = 1024 bytes, as file managers show it). */
export function formatBytes(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 0) return '—';
  if (bytes < 1024) return `${bytes} bytes`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  if (bytes < 1024 * 1024 * 1024) return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
  return `${(bytes / 1024 / 1024 / 1024).toFixed(2)} GB`;
}
