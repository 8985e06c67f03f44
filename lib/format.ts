/** Display formats shared by pages and exports. */

/** 1 h 2 min 3.4 s → "1:02:03.4" (tenths, as entrants claim times). */
export function formatDurationMs(ms: number | null | undefined): string {
  if (ms == null || !Number.isFinite(ms) || ms < 0) return '—';
  const tenths = Math.round(ms / 100);
  const h = Math.floor(tenths / 36000);
  const m = Math.floor((tenths % 36000) / 600);
  const s = Math.floor((tenths % 600) / 10);
  const t = tenths % 10;
  return `${h}:${String(m).padStart(2, '0')}:${String(s).padStart(2, '0')}.${t}`;
}

export function formatDate(iso: string | Date | null | undefined, timeZone = 'UTC'): string {
  if (!iso) return '—';
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeZone }).format(new Date(iso));
}

export function formatDateTime(iso: string | Date | null | undefined, timeZone = 'UTC'): string {
  if (!iso) return '—';
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone }).format(new Date(iso)) + (timeZone === 'UTC' ? ' UTC' : '');
}
