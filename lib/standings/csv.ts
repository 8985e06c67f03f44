/** Standings as CSV (RFC 4180: CRLF line ends, fields with comma, quote or line break in quotes). */
import type { StandingsRow } from './query';
import type { PublicStandingsRow } from './estimate';

export const CSV_COLUMNS = [
  'rank', 'entry_id', 'entrant', 'machine', 'motion', 'material', 'nozzle_mm', 'time_ms',
  'peak_flow_mm3s', 'p95_flow_mm3s', 'layer_height_mm', 'date',
] as const satisfies readonly (keyof StandingsRow)[];

export function csvField(v: unknown): string {
  if (v == null) return '';
  let s = String(v);
  // A leading =, +, - or @ makes spreadsheets run the cell as a formula (OWASP "CSV injection").
  if (typeof v === 'string' && /^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Added after the ranked row's columns, so readers keyed on the first columns keep working. */
export const ESTIMATE_COLUMNS = ['estimated_time_s', 'over_estimate_percent'] as const satisfies readonly (keyof PublicStandingsRow)[];

const cellsOf = (r: StandingsRow | PublicStandingsRow) => [
  ...CSV_COLUMNS.map((c) => csvField(r[c])),
  ...ESTIMATE_COLUMNS.map((c) => csvField((r as Partial<PublicStandingsRow>)[c])),
];

export function standingsCsv(rows: (StandingsRow | PublicStandingsRow)[]): string {
  const lines = [[...CSV_COLUMNS, ...ESTIMATE_COLUMNS].join(',')];
  for (const r of rows) lines.push(cellsOf(r).join(','));
  return lines.join('\r\n') + '\r\n';
}

/** A whole season in one file: every class's standings, one class after another, class columns first. */
export function seasonResultsCsv(classes: { class: { slug: string; name: string }; rows: PublicStandingsRow[] }[]): string {
  const lines = [['class', 'class_name', ...CSV_COLUMNS, ...ESTIMATE_COLUMNS].join(',')];
  for (const c of classes) for (const r of c.rows) lines.push([csvField(c.class.slug), csvField(c.class.name), ...cellsOf(r)].join(','));
  return lines.join('\r\n') + '\r\n';
}

/** Reads our own CSV back (for tests and tools): quoted fields, doubled quotes, CRLF. */
export function parseCsv(text: string): string[][] {
  const out: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') (field += '"'), i++;
      else if (ch === '"') quoted = false;
      else field += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') row.push(field), (field = '');
    else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[i + 1] === '\n') i++;
      row.push(field);
      out.push(row);
      row = [];
      field = '';
    } else field += ch;
  }
  if (field || row.length) out.push([...row, field]);
  return out;
}
