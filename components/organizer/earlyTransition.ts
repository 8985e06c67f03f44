/**
 * The question an organizer confirms before opening entries before the season's planned opening, or
 * closing them before the planned close; null when the step is on or after its planned time.
 */
import { formatDateTime } from '@/lib/format';

export function earlyTransitionQuestion(to: string, now: Date, season: { opensAt: string; closesAt: string; timeZone: string }): string | null {
  const at = (iso: string) => `${formatDateTime(iso, season.timeZone)}${season.timeZone === 'UTC' ? '' : ` (${season.timeZone})`}`;
  if (to === 'open' && now.getTime() < Date.parse(season.opensAt)) {
    return `Open entries now, before the planned opening on ${at(season.opensAt)}? Entrants can submit from this moment.`;
  }
  if (to === 'judging' && now.getTime() < Date.parse(season.closesAt)) {
    return `Close entries now, before the planned close on ${at(season.closesAt)}? Entrants can no longer submit or finish drafts.`;
  }
  return null;
}
