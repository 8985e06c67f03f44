'use client';
/**
 * The standings page's small client parts. The table itself, its sort and page links and these
 * forms' fields are rendered on the server (components/standings/StandingsTable.tsx), so the page
 * works without JavaScript; these only make it quicker to use:
 * - ViewForm: a GET form of the same page that, with JavaScript, moves to the new view at once when a
 *   select changes and a moment after the last key in a text field (no full reload, scroll kept);
 * - CopyLinkButton: copies the address of the view;
 * - StandingsRow + MorePrintsButton: a row that opens the entrant's other verified prints under it;
 * - LinkPending: inside a sort or page link, shows that the view it asked for is on its way.
 * No URL or parameter logic lives here: the form's fields are the query, and the server checks it.
 * Kept free of zod, TanStack Query and nuqs: they were most of the page's JavaScript.
 */
import { createContext, useContext, useEffect, useRef, useState, useTransition } from 'react';
import Link, { useLinkStatus } from 'next/link';
import { useRouter } from 'next/navigation';
import { formatDate, formatDurationMs, formatNumber } from '@/lib/format';

/** The form's fields as a query string, empty fields left out (an empty filter is no filter). */
function viewHref(form: HTMLFormElement): string {
  const url = new URL(form.action);
  url.search = '';
  for (const [k, v] of new FormData(form)) if (typeof v === 'string' && v.trim() !== '') url.searchParams.append(k, v.trim());
  return url.href;
}

export function ViewForm({ action, label, role, className, children }: { action: string; label: string; role?: 'search'; className?: string; children: React.ReactNode }) {
  const router = useRouter();
  const [pending, startTransition] = useTransition();
  const typing = useRef<ReturnType<typeof setTimeout> | null>(null);
  useEffect(() => () => { if (typing.current) clearTimeout(typing.current); }, []);
  const go = (form: HTMLFormElement) => {
    if (typing.current) clearTimeout(typing.current);
    const href = viewHref(form);
    startTransition(() => router.push(href, { scroll: false }));
  };
  return (
    <form
      method="get"
      action={action}
      aria-label={label}
      role={role}
      aria-busy={pending}
      className={className}
      onSubmit={(e) => {
        e.preventDefault();
        go(e.currentTarget);
      }}
      onChange={(e) => {
        const form = e.currentTarget;
        if (e.target instanceof HTMLSelectElement) go(form);
        else if (e.target instanceof HTMLInputElement) {
          if (typing.current) clearTimeout(typing.current);
          typing.current = setTimeout(() => go(form), 350);
        }
      }}
    >
      {children}
    </form>
  );
}

export function LinkPending() {
  const { pending } = useLinkStatus();
  return pending ? <span aria-hidden="true" className="ml-1 animate-pulse text-xs">loading…</span> : null;
}

export function CopyLinkButton() {
  const [copied, setCopied] = useState(false);
  return (
    <button
      type="button"
      className="btn-quiet"
      onClick={() => {
        const href = window.location.href;
        // The clipboard API needs a secure context; elsewhere show the link to copy by hand.
        if (navigator.clipboard) navigator.clipboard.writeText(href).then(() => setCopied(true), () => window.prompt('Copy this link:', href));
        else window.prompt('Copy this link:', href);
      }}
    >
      {copied ? 'Link copied' : 'Copy link to this view'}
    </button>
  );
}

/** One of the entrant's other verified prints, as the entrant's entries API answers it. */
interface OtherPrint {
  entry_id: number;
  machine: string;
  material: string;
  time_ms: number;
  peak_flow_mm3s: number | null;
  date: string | null;
}

type Others = OtherPrint[] | 'loading' | string;
const RowContext = createContext<{ open: boolean; toggle: () => void } | null>(null);

/**
 * A standings row (its cells rendered on the server) with room under it for the entrant's other
 * verified prints, read from the public entries API when first opened.
 */
export function StandingsRow({ entryId, entrant, othersUrl, columns, className, materialLabels, children }: {
  entryId: number;
  entrant: string;
  othersUrl: string | null;
  columns: number;
  className?: string;
  materialLabels: Record<string, string>;
  children: React.ReactNode;
}) {
  const [others, setOthers] = useState<Others | null>(null);
  const toggle = async () => {
    if (others) return setOthers(null);
    if (!othersUrl) return;
    setOthers('loading');
    try {
      const res = await fetch(othersUrl);
      const body = await res.json();
      if (!res.ok) throw new Error(body.error);
      setOthers((body.entries as OtherPrint[]).filter((e) => e.entry_id !== entryId));
    } catch (err) {
      setOthers(err instanceof Error && err.message ? err.message : 'Could not load the other prints.');
    }
  };
  return (
    <RowContext.Provider value={{ open: others != null, toggle }}>
      <tr data-testid="standings-row" data-entry={entryId} className={className}>{children}</tr>
      {others != null && (
        <tr className="bg-ink-50">
          <td />
          <td colSpan={columns - 1}>
            {others === 'loading' ? 'Loading other prints…' : typeof others === 'string' ? <span className="field-error">{others}</span> : (
              <ul className="space-y-1 text-sm" aria-label={`Other prints of ${entrant}`}>
                {others.map((r) => (
                  <li key={r.entry_id}>
                    <Link href={`/entries/${r.entry_id}`} className="num">{formatDurationMs(r.time_ms)}</Link> · {r.machine} · {materialLabels[r.material] ?? r.material} · peak {formatNumber(r.peak_flow_mm3s, 1)} mm³/s · {formatDate(r.date)}
                  </li>
                ))}
              </ul>
            )}
          </td>
        </tr>
      )}
    </RowContext.Provider>
  );
}

export function MorePrintsButton({ count }: { count: number }) {
  const row = useContext(RowContext);
  if (!row) return null;
  return (
    <button type="button" className="ml-2 text-xs text-ink-600 underline" aria-expanded={row.open} onClick={row.toggle}>
      {row.open ? 'hide' : `${count} more print${count > 1 ? 's' : ''}`}
    </button>
  );
}
