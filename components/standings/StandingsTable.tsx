/**
 * The standings table, rendered on the server: @tanstack/table-core (the engine under
 * @tanstack/react-table) in manual mode holds the columns, headers and cells; sorting, filtering and
 * paging are links and GET forms of this page, so the URL holds the view and a link reproduces it,
 * with or without JavaScript. The client parts (components/standings/StandingsControls.tsx) only
 * move between views without a reload and open an entrant's other prints.
 *
 * Why not the client table it was: its JavaScript (react-table, zod for the URL state, TanStack Query
 * and nuqs) took the page's first load from about 141 KB to 208 KB compressed
 * (scripts/bench-public.ts --weight-only), over the 150 KB public pages are allowed.
 */
import Link from 'next/link';
import { createColumnHelper, createTable, getCoreRowModel, type ColumnDef, type CellContext } from '@tanstack/table-core';
import { MATERIAL_FAMILIES, MATERIALS } from '@/lib/inspection/materials';
import { MOTION_SYSTEMS, MOTION_SYSTEM_LABELS, type MotionSystem } from '@/lib/domain';
import { standingsSearchParams, PER_PAGE_CHOICES, Q_MAX_LENGTH, type SortKey, type StandingsQuery } from '@/lib/standings/params';
import type { PublicStandingsRow as Row } from '@/lib/standings/estimate';
import { formatOverEstimate, OVER_ESTIMATE_EXPLANATION, OVER_ESTIMATE_LABEL } from '@/lib/standings/estimate';
import type { PublicStandingsPage } from '@/lib/standings/views';
import { formatDate, formatDurationMs, formatNumber, formatPageStatus } from '@/lib/format';
import { CopyLinkButton, LinkPending, MorePrintsButton, StandingsRow, ViewForm } from './StandingsControls';

const materialLabel = (m: string) => MATERIALS[m as keyof typeof MATERIALS]?.label ?? m;
const motionLabel = (m: string) => MOTION_SYSTEM_LABELS[m as MotionSystem] ?? m;
const MATERIAL_LABELS = Object.fromEntries(MATERIAL_FAMILIES.map((m) => [m, materialLabel(m)]));

/** Column id → API sort key; columns not listed are not sortable. Flow sorts highest first. */
const SORTABLE: Record<string, { key: SortKey; descFirst?: boolean }> = {
  rank: { key: 'rank' },
  entrant: { key: 'entrant' },
  machine: { key: 'machine' },
  nozzle_mm: { key: 'nozzle', descFirst: true },
  time_ms: { key: 'time' },
  peak_flow_mm3s: { key: 'peak_flow', descFirst: true },
  p95_flow_mm3s: { key: 'p95_flow', descFirst: true },
  layer_height_mm: { key: 'layer_height', descFirst: true },
  date: { key: 'date' },
};

/** Columns left out on a phone, so rank, entrant and time lead and fit the screen (the entry page and the CSV have the rest). */
const PHONE_HIDDEN = new Set(['over_estimate_percent', 'machine', 'motion', 'material', 'nozzle_mm', 'peak_flow_mm3s', 'p95_flow_mm3s', 'layer_height_mm', 'date']);

const col = createColumnHelper<Row>();
function num(digits: number) {
  return function NumberCell(c: CellContext<Row, number | null>) {
    return <span className="num">{formatNumber(c.getValue(), digits)}</span>;
  };
}

const COLUMNS = [
  col.accessor('rank', { header: 'Rank', cell: (c) => <span className="num font-semibold">{c.getValue()}</span> }),
  col.accessor('entrant', {
    header: 'Entrant',
    cell: (c) => (
      <div>
        <Link href={`/entrants/${c.row.original.entrant_id}`}>{c.getValue()}</Link>
        {c.row.original.verified_entries > 1 && <MorePrintsButton count={c.row.original.verified_entries - 1} />}
      </div>
    ),
  }),
  col.accessor('time_ms', { header: 'Time', cell: (c) => <Link className="num font-semibold" href={`/entries/${c.row.original.entry_id}`}>{formatDurationMs(c.getValue())}</Link> }),
  col.accessor('over_estimate_percent', {
    header: () => (
      <span title={OVER_ESTIMATE_EXPLANATION} className="cursor-help underline decoration-dotted underline-offset-2">
        {OVER_ESTIMATE_LABEL}
        <span className="sr-only">: {OVER_ESTIMATE_EXPLANATION}</span>
      </span>
    ),
    cell: (c) => <span className="num" title={c.row.original.estimated_time_s != null ? `Estimate ${formatDurationMs(c.row.original.estimated_time_s * 1000)}` : 'No finished inspection'}>{formatOverEstimate(c.getValue())}</span>,
  }),
  col.accessor('machine', { header: 'Machine', cell: (c) => <Link href={`/machines/${c.row.original.machine_id}`}>{c.getValue()}</Link> }),
  col.accessor('motion', { header: 'Motion', cell: (c) => motionLabel(c.getValue()) }),
  col.accessor('material', { header: 'Material', cell: (c) => materialLabel(c.getValue()) }),
  col.accessor('nozzle_mm', { header: 'Nozzle (mm)', cell: num(2) }),
  col.accessor('peak_flow_mm3s', { header: 'Peak flow (mm³/s)', cell: num(1) }),
  col.accessor('p95_flow_mm3s', { header: 'P95 flow (mm³/s)', cell: num(1) }),
  col.accessor('layer_height_mm', { header: 'Layer (mm)', cell: num(2) }),
  col.accessor('date', { header: 'Submitted', cell: (c) => formatDate(c.getValue()) }),
] as ColumnDef<Row, unknown>[];

/** A header or cell template rendered to React (what react-table's flexRender does, without its hooks module). */
function render<P extends object>(template: unknown, props: P): React.ReactNode {
  return typeof template === 'function' ? (template as (p: P) => React.ReactNode)(props) : (template as React.ReactNode);
}

export function StandingsTable({ seasonSlug, classSlug, query, data }: { seasonSlug: string; classSlug: string; query: StandingsQuery; data: PublicStandingsPage }) {
  const pagePath = `/seasons/${seasonSlug}/classes/${classSlug}`;
  const api = `/api/v1/seasons/${seasonSlug}/classes/${classSlug}/standings`;
  const href = (patch: Partial<StandingsQuery>) => {
    const qs = standingsSearchParams({ ...query, ...patch }).toString();
    return qs ? `${pagePath}?${qs}` : pagePath;
  };
  const sortedId = Object.entries(SORTABLE).find(([, s]) => s.key === query.sort)?.[0] ?? 'rank';

  // Headers and cells only: the rows arrive sorted, filtered and paged by the query, and the links
  // below carry the view, so the table keeps no state of its own (its defaults, set once).
  const table = createTable<Row>({
    data: data.rows,
    columns: COLUMNS,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (r) => String(r.entry_id),
    state: {},
    onStateChange: () => {},
    renderFallbackValue: null,
  });
  table.setOptions((prev) => ({ ...prev, state: table.initialState }));

  // The fields other than the form's own, carried as hidden inputs so a form changes one thing.
  const hidden = (omit: string[]) =>
    [...standingsSearchParams(query).entries()].filter(([k]) => !omit.includes(k)).map(([k, v]) => <input key={k} type="hidden" name={k} value={v} />);
  const last = Math.max(1, data.pages);
  const csvHref = `${api}?${standingsSearchParams(query, { format: 'csv', withPaging: false }).toString()}`;

  return (
    <section aria-label="Standings" className="space-y-4">
      <ViewForm action={pagePath} label="Filter the standings" role="search" className="card flex flex-wrap items-end gap-4">
        {hidden(['material', 'motion', 'q', 'page'])}
        <div>
          <label className="label" htmlFor="f-material">Material</label>
          <select key={query.material ?? ''} id="f-material" name="material" className="input" defaultValue={query.material ?? ''}>
            <option value="">All materials</option>
            {MATERIAL_FAMILIES.map((m) => <option key={m} value={m}>{materialLabel(m)}</option>)}
          </select>
        </div>
        <div>
          <label className="label" htmlFor="f-motion">Motion system</label>
          <select key={query.motion ?? ''} id="f-motion" name="motion" className="input" defaultValue={query.motion ?? ''}>
            <option value="">All motion systems</option>
            {MOTION_SYSTEMS.map((m) => <option key={m} value={m}>{motionLabel(m)}</option>)}
          </select>
        </div>
        <div className="min-w-48 flex-1">
          <label className="label" htmlFor="f-q">Machine name</label>
          <input id="f-q" name="q" className="input" type="search" maxLength={Q_MAX_LENGTH} placeholder="Search machines" defaultValue={query.q ?? ''} />
        </div>
        <div className="flex gap-2">
          <button type="submit" className="btn-quiet">Apply filters</button>
          <a className="btn-quiet" href={csvHref} download data-testid="csv-link">Download CSV</a>
          <CopyLinkButton />
        </div>
      </ViewForm>

      <div className="card overflow-x-auto p-0">
        <table className="table" data-testid="standings-table">
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sort = SORTABLE[h.column.id];
                  const dir = h.column.id === sortedId ? (query.desc ? 'desc' : 'asc') : null;
                  const label = render(h.column.columnDef.header, h.getContext());
                  // First click: the column's natural direction; again: the other one.
                  const nextDesc = dir ? dir === 'asc' : !!sort?.descFirst;
                  return (
                    <th key={h.id} scope="col" className={PHONE_HIDDEN.has(h.column.id) ? 'hidden sm:table-cell' : undefined} aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : undefined}>
                      {sort ? (
                        <Link scroll={false} href={href({ sort: sort.key, desc: nextDesc, page: 1 })} className="inline-flex items-center gap-1 font-semibold text-ink-700 hover:text-ember-700">
                          {label}
                          <span aria-hidden="true" className="text-xs">{dir === 'asc' ? '▲' : dir === 'desc' ? '▼' : '↕'}</span>
                          <LinkPending />
                        </Link>
                      ) : (
                        label
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => {
              const cells = row.getVisibleCells().map((cell) => (
                <td key={cell.id} className={PHONE_HIDDEN.has(cell.column.id) ? 'hidden sm:table-cell' : undefined}>
                  {render(cell.column.columnDef.cell, cell.getContext())}
                </td>
              ));
              const r = row.original;
              return r.verified_entries > 1 ? (
                <StandingsRow key={row.id} entryId={r.entry_id} entrant={r.entrant} columns={COLUMNS.length} materialLabels={MATERIAL_LABELS} othersUrl={`/api/v1/seasons/${seasonSlug}/classes/${classSlug}/entrants/${r.entrant_id}/entries`}>
                  {cells}
                </StandingsRow>
              ) : (
                <tr key={row.id} data-testid="standings-row" data-entry={r.entry_id}>{cells}</tr>
              );
            })}
            {!data.rows.length && (
              <tr><td colSpan={COLUMNS.length} className="py-6 text-center text-ink-600">{query.page > last ? 'This page is past the last one: go to the last page.' : 'No verified entry matches this view.'}</td></tr>
            )}
          </tbody>
        </table>
      </div>

      <nav aria-label="Pages" className="flex flex-wrap items-center gap-3">
        {query.page > 1 ? <Link scroll={false} className="btn-quiet" href={href({ page: Math.min(query.page - 1, last) })}>Previous page<LinkPending /></Link> : <span className="btn-quiet opacity-50" aria-disabled="true">Previous page</span>}
        <span data-testid="page-status" className="text-sm text-ink-700">{formatPageStatus(query.page, data.pages, data.total)}</span>
        {query.page < data.pages ? <Link scroll={false} className="btn-quiet" href={href({ page: query.page + 1 })}>Next page<LinkPending /></Link> : <span className="btn-quiet opacity-50" aria-disabled="true">Next page</span>}
        {query.page > last && <Link scroll={false} className="btn-quiet" href={href({ page: last })}>Go to the last page</Link>}
        <ViewForm action={pagePath} label="Page length" className="ml-auto flex items-center gap-2 text-sm text-ink-700">
          {hidden(['per_page', 'page'])}
          <label htmlFor="f-per-page">Rows per page</label>
          <select key={query.perPage} id="f-per-page" name="per_page" className="input w-auto" defaultValue={String(query.perPage)}>
            {PER_PAGE_CHOICES.map((n) => <option key={n} value={n}>{n}</option>)}
          </select>
          <noscript><button type="submit" className="btn-quiet">Show</button></noscript>
        </ViewForm>
      </nav>
    </section>
  );
}
