/**
 * Season dates are entered as a wall-clock time in the season's own time zone (an IANA name) and
 * stored as UTC instants. Only the platform's Intl time-zone data is used: no library, and the
 * offsets (including daylight-saving changes) come from the IANA tz database Node ships with.
 * Client-safe: no Node or database imports.
 */

export const LOCAL_DATETIME_RE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/;

/**
 * A real calendar date and time in the fixed format: month 1–12, a day that month has (leap years
 * by the Gregorian rule), hour 0–23, minute 0–59. `Date.UTC` would roll 2026-13-45T99:99 over
 * into a date in 2027 instead of refusing it.
 */
export function isRealLocalDateTime(local: string): boolean {
  const m = LOCAL_DATETIME_RE.exec(local);
  if (!m) return false;
  const [y, mo, d, h, mi] = m.slice(1).map(Number);
  if (mo < 1 || mo > 12 || d < 1 || h > 23 || mi > 59) return false;
  const leap = (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
  const days = [31, leap ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][mo - 1];
  return d <= days;
}

export function isTimeZone(tz: string): boolean {
  if (!tz || tz.length > 64) return false;
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

function wallClockParts(utcMs: number, tz: string) {
  const parts = new Intl.DateTimeFormat('en-US', {
    timeZone: tz,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
  }).formatToParts(new Date(utcMs));
  const get = (t: string) => Number(parts.find((p) => p.type === t)?.value);
  return { y: get('year'), mo: get('month'), d: get('day'), h: get('hour'), mi: get('minute'), s: get('second') };
}

/** Offset of the zone from UTC at that instant, in ms (east positive: Europe/Berlin in winter = +3 600 000). */
export function zoneOffsetMs(utcMs: number, tz: string): number {
  const p = wallClockParts(utcMs, tz);
  return Date.UTC(p.y, p.mo - 1, p.d, p.h, p.mi, p.s) - Math.floor(utcMs / 1000) * 1000;
}

/**
 * "2026-12-01T18:00" in `tz` → the UTC instant. Two passes settle the offset next to a
 * daylight-saving change; a wall time that does not exist (skipped hour) lands after the gap.
 */
export function zonedLocalToUtc(local: string, tz: string): Date {
  const m = LOCAL_DATETIME_RE.exec(local);
  if (!m || !isRealLocalDateTime(local)) throw new RangeError(`Not a local date-time: ${JSON.stringify(local)}`);
  const guess = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]), Number(m[4]), Number(m[5]));
  const first = zoneOffsetMs(guess, tz);
  let t = guess - first;
  const second = zoneOffsetMs(t, tz);
  if (second !== first) t = guess - second;
  return new Date(t);
}

/** The UTC instant as the wall-clock "YYYY-MM-DDTHH:mm" of `tz` (for datetime-local inputs). */
export function utcToZonedLocal(date: Date, tz: string): string {
  const p = wallClockParts(date.getTime(), tz);
  const two = (n: number) => String(n).padStart(2, '0');
  return `${p.y}-${two(p.mo)}-${two(p.d)}T${two(p.h)}:${two(p.mi)}`;
}
