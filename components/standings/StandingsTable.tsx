'use client';
/**
 * The standings table: @tanstack/react-table in manual mode — sorting, filtering and paging run on
 * the server through /api/v1/…/standings, and the URL holds the table state (nuqs, shallow: the
 * page is not rendered again, the table fetches its rows) so a link reproduces the view. A row with several verified prints expands to show the entrant's other prints.
 */
import { Fragment, useCallback, useEffect, useMemo, useRef, useState } from 'react';
import Link from 'next/link';
import { parseAsString, useQueryStates } from 'nuqs';
import { useJsonRead } from '@/components/useJsonRead';
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import { MATERIAL_FAMILIES, MATERIALS } from '@/lib/inspection/materials';
import { MOTION_SYSTEMS, MOTION_SYSTEM_LABELS, type MotionSystem } from '@/lib/domain';
import { parseStandingsQuery, standingsSearchParams, PER_PAGE_CHOICES, Q_MAX_LENGTH, DEFAULT_QUERY, type SortKey, type StandingsQuery } from '@/lib/standings/params';
import type { PublicStandingsRow as StandingsRow } from '@/lib/standings/estimate';
import { formatOverEstimate, OVER_ESTIMATE_EXPLANATION, OVER_ESTIMATE_LABEL } from '@/lib/standings/estimate';
import type { PublicStandingsPage as StandingsPage } from '@/lib/standings/views';
import { formatDate, formatDurationMs, formatNumber, formatPageStatus } from '@/lib/format';

const materialLabel = (m: string) => MATERIALS[m as keyof typeof MATERIALS]?.label ?? m;
const motionLabel = (m: string) => MOTION_SYSTEM_LABELS[m as MotionSystem] ?? m;

const col = createColumnHelper<StandingsRow>();

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
const COLUMN_OF_SORT = Object.fromEntries(Object.entries(SORTABLE).map(([id, s]) => [s.key, id])) as Record<SortKey, string>;

interface OlderRun {
  entry_id: number;
  rank: number | null;
  machine: string;
  material: string;
  time_ms: number;
  peak_flow_mm3s: number | null;
  date: string | null;
}

/** Columns left out on a phone, so rank, entrant and time lead and fit the screen (the entry page and the CSV have the rest). */
const PHONE_HIDDEN = new Set(['over_estimate_percent', 'machine', 'motion', 'material', 'nozzle_mm', 'peak_flow_mm3s', 'p95_flow_mm3s', 'layer_height_mm', 'date']);

/** The URL parameters the table keeps (the API's names); validated by the shared zod schema, not here. */
const URL_KEYS = ['page', 'per_page', 'sort', 'material', 'motion', 'q'] as const;
const URL_STATE = Object.fromEntries(URL_KEYS.map((k) => [k, parseAsString])) as Record<(typeof URL_KEYS)[number], typeof parseAsString>;

export function StandingsTable({ seasonSlug, classSlug, initial, initialKey }: { seasonSlug: string; classSlug: string; initial: StandingsPage; initialKey: string }) {
  const [urlState, setUrlState] = useQueryStates(URL_STATE, { history: 'push', scroll: false, shallow: true });
  const search = new URLSearchParams(Object.entries(urlState).filter((e): e is [string, string] => e[1] != null)).toString();
  const query: StandingsQuery = useMemo(() => {
    try {
      return parseStandingsQuery(new URLSearchParams(search));
    } catch {
      return DEFAULT_QUERY;
    }
  }, [search]);
  const api = `/api/v1/seasons/${seasonSlug}/classes/${classSlug}/standings`;
  const [qText, setQText] = useState(query.q ?? '');
  const [older, setOlder] = useState<Record<number, OlderRun[] | 'loading' | string>>({});
  const [copied, setCopied] = useState(false);
  const key = standingsSearchParams(query).toString();

  const { data, error, loading } = useJsonRead<StandingsPage>(`${api}?${key}`, initial, `${api}?${initialKey}`);

  const navigate = useCallback(
    (patch: Partial<StandingsQuery>) => {
      const next = { ...query, ...patch };
      const qs = standingsSearchParams(next);
      void setUrlState(Object.fromEntries(URL_KEYS.map((k) => [k, qs.get(k)])));
    },
    [query, setUrlState],
  );

  // Search as you type, a moment after the last key.
  const typing = useRef<ReturnType<typeof setTimeout> | null>(null);
  const onSearch = (text: string) => {
    setQText(text);
    if (typing.current) clearTimeout(typing.current);
    typing.current = setTimeout(() => navigate({ q: text.trim() || undefined, page: 1 }), 350);
  };
  useEffect(() => setQText(query.q ?? ''), [query.q]);

  const toggleOlder = async (row: StandingsRow) => {
    if (older[row.entry_id]) {
      setOlder(({ [row.entry_id]: _, ...rest }) => rest);
      return;
    }
    setOlder((o) => ({ ...o, [row.entry_id]: 'loading' }));
    try {
      const res = await fetch(`/api/v1/seasons/${seasonSlug}/classes/${classSlug}/entrants/${row.entrant_id}/entries`);
      const body = await res.json();
      if (!res.ok) throw new Error(body.error);
      setOlder((o) => ({ ...o, [row.entry_id]: (body.entries as OlderRun[]).filter((e) => e.entry_id !== row.entry_id) }));
    } catch (err) {
      setOlder((o) => ({ ...o, [row.entry_id]: err instanceof Error ? err.message : 'Could not load the other prints.' }));
    }
  };

  const columns = useMemo(
    () => [
      col.accessor('rank', { header: 'Rank', cell: (c) => <span className="num font-semibold">{c.getValue()}</span> }),
      col.accessor('entrant', {
        header: 'Entrant',
        cell: (c) => (
          <div>
            <Link href={`/entrants/${c.row.original.entrant_id}`}>{c.getValue()}</Link>
            {c.row.original.verified_entries > 1 && (
              <button type="button" className="ml-2 text-xs text-ink-600 underline" aria-expanded={!!older[c.row.original.entry_id]} onClick={() => toggleOlder(c.row.original)}>
                {older[c.row.original.entry_id] ? 'hide' : `${c.row.original.verified_entries - 1} more print${c.row.original.verified_entries > 2 ? 's' : ''}`}
              </button>
            )}
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
        enableSorting: false,
        cell: (c) => <span className="num" title={c.row.original.estimated_time_s != null ? `Estimate ${formatDurationMs(c.row.original.estimated_time_s * 1000)}` : 'No finished inspection'}>{formatOverEstimate(c.getValue())}</span>,
      }),
      col.accessor('machine', { header: 'Machine', cell: (c) => <Link href={`/machines/${c.row.original.machine_id}`}>{c.getValue()}</Link> }),
      col.accessor('motion', { header: 'Motion', enableSorting: false, cell: (c) => motionLabel(c.getValue()) }),
      col.accessor('material', { header: 'Material', enableSorting: false, cell: (c) => materialLabel(c.getValue()) }),
      col.accessor('nozzle_mm', { header: 'Nozzle (mm)', cell: (c) => <span className="num">{formatNumber(c.getValue(), 2)}</span> }),
      col.accessor('peak_flow_mm3s', { header: 'Peak flow (mm³/s)', cell: (c) => <span className="num">{formatNumber(c.getValue(), 1)}</span> }),
      col.accessor('p95_flow_mm3s', { header: 'P95 flow (mm³/s)', cell: (c) => <span className="num">{formatNumber(c.getValue(), 1)}</span> }),
      col.accessor('layer_height_mm', { header: 'Layer (mm)', cell: (c) => <span className="num">{formatNumber(c.getValue(), 2)}</span> }),
      col.accessor('date', { header: 'Submitted', cell: (c) => formatDate(c.getValue()) }),
    ],
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [older],
  );

  const sorting: SortingState = query.sort === 'rank' && !query.desc ? [] : [{ id: COLUMN_OF_SORT[query.sort], desc: query.desc }];
  const table = useReactTable({
    data: data.rows,
    columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (r) => String(r.entry_id),
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    enableMultiSort: false,
    pageCount: data.pages,
    rowCount: data.total,
    state: { sorting, pagination: { pageIndex: query.page - 1, pageSize: query.perPage } },
    onSortingChange: (updater) => {
      const next = typeof updater === 'function' ? updater(sorting) : updater;
      const s = next[0];
      navigate({ sort: s ? SORTABLE[s.id].key : 'rank', desc: s ? s.desc : false, page: 1 });
    },
    onPaginationChange: (updater) => {
      const next = typeof updater === 'function' ? updater({ pageIndex: query.page - 1, pageSize: query.perPage }) : updater;
      navigate({ page: next.pageIndex + 1, perPage: next.pageSize });
    },
  });
  const sortableIds = new Set(Object.keys(SORTABLE));

  const csvHref = `${api}?${standingsSearchParams(query, { format: 'csv', withPaging: false }).toString()}`;

  return (
    <section aria-label="Standings" className="space-y-4">
      <form className="card flex flex-wrap items-end gap-4" role="search" onSubmit={(e) => { e.preventDefault(); navigate({ q: qText.trim() || undefined, page: 1 }); }}>
        <div>
          <label className="label" htmlFor="f-material">Material</label>
          <select id="f-material" className="input" value={query.material ?? ''} onChange={(e) => navigate({ material: (e.target.value || undefined) as StandingsQuery['material'], page: 1 })}>
            <option value="">All materials</option>
            {MATERIAL_FAMILIES.map((m) => <option key={m} value={m}>{materialLabel(m)}</option>)}
          </select>
        </div>
        <div>
          <label className="label" htmlFor="f-motion">Motion system</label>
          <select id="f-motion" className="input" value={query.motion ?? ''} onChange={(e) => navigate({ motion: (e.target.value || undefined) as StandingsQuery['motion'], page: 1 })}>
            <option value="">All motion systems</option>
            {MOTION_SYSTEMS.map((m) => <option key={m} value={m}>{motionLabel(m)}</option>)}
          </select>
        </div>
        <div className="min-w-48 flex-1">
          <label className="label" htmlFor="f-q">Machine name</label>
          <input id="f-q" className="input" type="search" maxLength={Q_MAX_LENGTH} placeholder="Search machines" value={qText} onChange={(e) => onSearch(e.target.value)} />
        </div>
        <div className="flex gap-2">
          <a className="btn-quiet" href={csvHref} download data-testid="csv-link">Download CSV</a>
          <button type="button" className="btn-quiet" onClick={() => {
              const href = window.location.href;
              // The clipboard API needs a secure context; elsewhere show the link to copy by hand.
              if (navigator.clipboard) navigator.clipboard.writeText(href).then(() => setCopied(true), () => window.prompt('Copy this link:', href));
              else window.prompt('Copy this link:', href);
            }}>
            {copied ? 'Link copied' : 'Copy link to this view'}
          </button>
        </div>
      </form>

      {error && <p role="alert" className="field-error">{error}</p>}
      <div className="card overflow-x-auto p-0" aria-busy={loading}>
        <table className="table" data-testid="standings-table">
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sortable = sortableIds.has(h.column.id) && h.column.getCanSort();
                  const dir = h.column.getIsSorted() || (h.column.id === 'rank' && !sorting.length ? 'asc' : false);
                  return (
                    <th key={h.id} scope="col" className={PHONE_HIDDEN.has(h.column.id) ? 'hidden sm:table-cell' : undefined} aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : undefined}>
                      {sortable ? (
                        <button
                          type="button"
                          className="inline-flex items-center gap-1 font-semibold text-ink-700 hover:text-ember-700"
                          onClick={() => {
                            const spec = SORTABLE[h.column.id];
                            const cur = h.column.getIsSorted();
                            const desc = cur ? cur === 'asc' : !!spec.descFirst;
                            table.setSorting(h.column.id === 'rank' && !desc ? [] : [{ id: h.column.id, desc }]);
                          }}
                        >
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden="true" className="text-xs">{dir === 'asc' ? '▲' : dir === 'desc' ? '▼' : '↕'}</span>
                        </button>
                      ) : (
                        flexRender(h.column.columnDef.header, h.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody className={loading ? 'opacity-50' : ''}>
            {table.getRowModel().rows.map((row) => {
              const prints = older[row.original.entry_id];
              return (
                <Fragment key={row.id}>
                  <tr data-testid="standings-row" data-entry={row.original.entry_id}>
                    {row.getVisibleCells().map((cell) => <td key={cell.id} className={PHONE_HIDDEN.has(cell.column.id) ? 'hidden sm:table-cell' : undefined}>{flexRender(cell.column.columnDef.cell, cell.getContext())}</td>)}
                  </tr>
                  {prints && (
                    <tr className="bg-ink-50">
                      <td />
                      <td colSpan={columns.length - 1}>
                        {prints === 'loading' ? 'Loading other prints…' : typeof prints === 'string' ? <span className="field-error">{prints}</span> : (
                          <ul className="space-y-1 text-sm" aria-label={`Other prints of ${row.original.entrant}`}>
                            {prints.map((r) => (
                              <li key={r.entry_id}>
                                <Link href={`/entries/${r.entry_id}`} className="num">{formatDurationMs(r.time_ms)}</Link> · {r.machine} · {materialLabel(r.material)} · peak {formatNumber(r.peak_flow_mm3s, 1)} mm³/s · {formatDate(r.date)}
                              </li>
                            ))}
                          </ul>
                        )}
                      </td>
                    </tr>
                  )}
                </Fragment>
              );
            })}
            {!data.rows.length && (
              <tr><td colSpan={columns.length} className="py-6 text-center text-ink-600">{query.page > Math.max(1, data.pages) ? 'This page is past the last one: go to the last page.' : 'No verified entry matches this view.'}</td></tr>
            )}
          </tbody>
        </table>
      </div>

      <nav aria-label="Pages" className="flex flex-wrap items-center gap-3">
        <button type="button" className="btn-quiet" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>Previous page</button>
        <span data-testid="page-status" className="text-sm text-ink-700">
          {formatPageStatus(query.page, data.pages, data.total)}
        </span>
        <button type="button" className="btn-quiet" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>Next page</button>
        {query.page > Math.max(1, data.pages) && (
          <button type="button" className="btn-quiet" onClick={() => table.setPageIndex(Math.max(1, data.pages) - 1)}>Go to the last page</button>
        )}
        <label className="ml-auto flex items-center gap-2 text-sm text-ink-700">
          Rows per page
          <select className="input w-auto" value={query.perPage} onChange={(e) => table.setPagination({ pageIndex: 0, pageSize: Number(e.target.value) })}>
            {PER_PAGE_CHOICES.map((n) => <option key={n} value={n}>{n}</option>)}
          </select>
        </label>
      </nav>
    </section>
  );
}
