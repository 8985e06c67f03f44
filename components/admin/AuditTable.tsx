'use client';
/**
 * The audit log as a table: @tanstack/react-table in manual mode — filtering and paging run on the
 * server (/api/admin/audit), the URL holds the filters and page (nuqs), so a link reproduces the view.
 */
import { useEffect, useMemo, useState } from 'react';
import { parseAsInteger, parseAsString, parseAsStringLiteral, useQueryStates } from 'nuqs';
import { useJsonRead } from '@/components/useJsonRead';
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import { AUDIT_ACTIONS } from '@/lib/domain';
import { AUDIT_ACTION_LABELS, AUDIT_PER_PAGE } from '@/lib/auditText';
import { formatDateTime, formatPageStatus } from '@/lib/format';
import type { AuditLogPage } from '@/lib/admin';

type Event = AuditLogPage['events'][number];
const col = createColumnHelper<Event>();

const URL_STATE = {
  action: parseAsStringLiteral(AUDIT_ACTIONS),
  actor: parseAsString,
  from: parseAsString,
  to: parseAsString,
  page: parseAsInteger,
  per_page: parseAsInteger,
};

export function AuditTable({ initial }: { initial: AuditLogPage }) {
  const [q, setQ] = useQueryStates(URL_STATE, { history: 'push', shallow: true, scroll: false });
  const key = useMemo(() => {
    const p = new URLSearchParams();
    for (const [k, v] of Object.entries(q)) if (v != null && v !== '') p.set(k, String(v));
    return p.toString();
  }, [q]);
  const [initialKey] = useState(key);
  const { data, error, loading } = useJsonRead<AuditLogPage>(`/api/admin/audit?${key}`, initial, `/api/admin/audit?${initialKey}`);
  const [actorText, setActorText] = useState(q.actor ?? '');


  const columns = useMemo(
    () => [
      col.accessor('createdAt', { header: 'When (UTC)', cell: (c) => <span className="whitespace-nowrap">{formatDateTime(c.getValue())}</span> }),
      col.accessor('label', {
        header: 'Action',
        cell: (c) => (
          <div>
            <div className="font-semibold">{c.getValue()}</div>
            <div className="font-mono text-[11px] text-ink-500">{c.row.original.action}</div>
          </div>
        ),
      }),
      col.accessor('sentence', {
        header: 'What happened',
        cell: (c) => (
          <div className="min-w-64 space-y-1">
            <p>{c.getValue()}</p>
            {c.row.original.detailPairs.length > 0 && (
              <details className="text-xs text-ink-600">
                <summary className="cursor-pointer">All recorded fields</summary>
                <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-3">
                  {c.row.original.detailPairs.map(([k, v]) => (
                    <div key={k} className="contents"><dt className="text-ink-500">{k}</dt><dd className="break-all">{v}</dd></div>
                  ))}
                </dl>
              </details>
            )}
          </div>
        ),
      }),
      col.accessor('actor', { header: 'Who', cell: (c) => <span className="break-all">{c.getValue()}</span> }),
      col.accessor('subject', { header: 'Subject' }),
      col.accessor('ip', { header: 'Client address', cell: (c) => <span className="font-mono text-xs">{c.getValue() ?? '—'}</span> }),
    ],
    [],
  );

  const perPage = data.per_page;
  const table = useReactTable({
    data: data.events,
    columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (r) => String(r.id),
    manualPagination: true,
    manualFiltering: true,
    pageCount: data.pages,
    rowCount: data.total,
    state: { pagination: { pageIndex: data.page - 1, pageSize: perPage } },
    onPaginationChange: (updater) => {
      const next = typeof updater === 'function' ? updater({ pageIndex: data.page - 1, pageSize: perPage }) : updater;
      void setQ({ page: next.pageIndex + 1 === 1 ? null : next.pageIndex + 1, per_page: next.pageSize === 50 ? null : next.pageSize });
    },
  });
  const filter = (patch: Partial<typeof q>) => void setQ({ ...patch, page: null });

  return (
    <section aria-label="Audit events" className="space-y-4">
      <form
        role="search"
        className="card flex flex-wrap items-end gap-4"
        onSubmit={(e) => {
          e.preventDefault();
          filter({ actor: actorText.trim() || null });
        }}
      >
        <div>
          <label className="label" htmlFor="a-action">Action</label>
          <select id="a-action" className="input" value={q.action ?? ''} onChange={(e) => filter({ action: (e.target.value || null) as typeof q.action })}>
            <option value="">All actions</option>
            {AUDIT_ACTIONS.map((a) => <option key={a} value={a}>{AUDIT_ACTION_LABELS[a]}</option>)}
          </select>
        </div>
        <div className="min-w-48 flex-1">
          <label className="label" htmlFor="a-actor">Who (name or e-mail; “system”)</label>
          <input id="a-actor" className="input" type="search" maxLength={120} value={actorText} onChange={(e) => setActorText(e.target.value)} onBlur={() => filter({ actor: actorText.trim() || null })} />
        </div>
        <div>
          <label className="label" htmlFor="a-from">From (UTC day)</label>
          <input id="a-from" className="input" type="date" value={q.from ?? ''} onChange={(e) => filter({ from: e.target.value || null })} />
        </div>
        <div>
          <label className="label" htmlFor="a-to">To (UTC day, included)</label>
          <input id="a-to" className="input" type="date" value={q.to ?? ''} onChange={(e) => filter({ to: e.target.value || null })} />
        </div>
        <div className="flex gap-2">
          <button type="submit" className="btn-primary">Filter</button>
          <button type="button" className="btn-quiet" onClick={() => { setActorText(''); void setQ({ action: null, actor: null, from: null, to: null, page: null }); }}>Clear</button>
        </div>
      </form>

      {error && <p role="alert" className="field-error">{error}</p>}
      <div className="card overflow-x-auto p-0" aria-busy={loading}>
        <table className="table" data-testid="audit-table">
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>{hg.headers.map((h) => <th key={h.id} scope="col">{flexRender(h.column.columnDef.header, h.getContext())}</th>)}</tr>
            ))}
          </thead>
          <tbody className={loading ? 'opacity-50' : ''}>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} data-testid="audit-row">
                {row.getVisibleCells().map((cell) => <td key={cell.id} className="align-top">{flexRender(cell.column.columnDef.cell, cell.getContext())}</td>)}
              </tr>
            ))}
            {!data.events.length && (
              <tr><td colSpan={columns.length} className="py-6 text-center text-ink-600">No audit event matches these filters.</td></tr>
            )}
          </tbody>
        </table>
      </div>

      <nav aria-label="Pages" className="flex flex-wrap items-center gap-3">
        <button type="button" className="btn-quiet" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>Previous page</button>
        <span className="text-sm text-ink-700" data-testid="audit-page-status">{formatPageStatus(data.page, data.pages, data.total, (n) => `${n} event${n === 1 ? '' : 's'}`)}</span>
        <button type="button" className="btn-quiet" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>Next page</button>
        <label className="ml-auto flex items-center gap-2 text-sm text-ink-700">
          Rows per page
          <select className="input w-auto" value={perPage} onChange={(e) => table.setPagination({ pageIndex: 0, pageSize: Number(e.target.value) })}>
            {AUDIT_PER_PAGE.map((n) => <option key={n} value={n}>{n}</option>)}
          </select>
        </label>
      </nav>
    </section>
  );
}
