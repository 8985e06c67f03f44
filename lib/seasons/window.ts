/**
 * The entry window: a season takes entries while it is open AND between its published opening and
 * closing dates. Opening a season early (to let people read the rulebook) does not start the race.
 * Framework-free: plain fields in, a sentence out.
 */
import { formatDateTime } from '@/lib/format';

export interface SeasonWindow {
  name: string;
  state: string;
  opensAt: Date;
  closesAt: Date;
  timeZone?: string | null;
}

const when = (d: Date, tz: string | null | undefined) => `${formatDateTime(d, tz || 'UTC')}${tz && tz !== 'UTC' ? ` (${tz})` : ''}`;

/** Why the season takes no entries at `now`, as a sentence; null while it does. */
export function entryWindowProblem(season: SeasonWindow, now = new Date()): string | null {
  if (season.state !== 'open') return `${season.name} is not open for entries (it is ${season.state}).`;
  if (now < season.opensAt) return `${season.name} takes entries from ${when(season.opensAt, season.timeZone)} until ${when(season.closesAt, season.timeZone)}; come back when it opens.`;
  if (now >= season.closesAt) return `${season.name} took entries until ${when(season.closesAt, season.timeZone)}; the entry window has closed.`;
  return null;
}
