import { requirePageRole } from '@/lib/auth/guard';
import { listOutbox } from '@/lib/admin';
import { mailTransportKind, outboxBodiesVisible } from '@/lib/mail';
import { formatDateTime } from '@/lib/format';

export const metadata = { title: 'Outbox' };

/** The message text with its http(s) addresses as links (opened in a new tab), everything else as text. */
function linkify(text: string | null) {
  if (!text) return text;
  return text.split(/(https?:\/\/[^\s<>"]+)/g).map((part, i) => {
    if (i % 2 === 0) return part;
    // A sentence's closing punctuation is not part of the address.
    const url = part.replace(/[.,;:!?)]+$/, '');
    return (
      <span key={i}>
        <a href={url} target="_blank" rel="noopener noreferrer nofollow" data-testid="mail-link">{url}</a>
        {part.slice(url.length)}
      </span>
    );
  });
}

export default async function OutboxPage({ searchParams }: { searchParams: Promise<{ to?: string }> }) {
  await requirePageRole('/admin/outbox', 'admin');
  const { to } = await searchParams;
  const messages = await listOutbox({ to });
  const bodies = outboxBodiesVisible();
  return (
    <div className="space-y-6">
      <h1>Outbox</h1>
      <p className="text-sm text-ink-600">
        {mailTransportKind() === 'fake'
          ? 'No SMTP_URL is set, so mail stays here instead of leaving the machine.'
          : 'Mail goes out through SMTP; this is the record of what was sent, without the message bodies (they belong to the recipients).'}
      </p>
      <form className="flex gap-2" action="/admin/outbox">
        <label htmlFor="to" className="sr-only">Recipient</label>
        <input id="to" name="to" defaultValue={to} placeholder="Filter by recipient" className="input max-w-xs" />
        <button className="btn-quiet">Filter</button>
      </form>
      <ul className="space-y-3">
        {messages.map((m) => (
          <li key={m.id} className="card" data-testid="outbox-message">
            <p className="text-sm text-ink-500">
              {formatDateTime(m.createdAt)} · to <span data-testid="mail-to">{m.to}</span> · {m.transport} ·{' '}
              <span data-testid="mail-status">
                {m.status === 'sent' ? 'sent' : m.status === 'failed' ? `not delivered after ${m.attempts} attempts` : m.attempts ? `waiting to retry (attempt ${m.attempts} failed)` : 'waiting to be sent'}
              </span>
            </p>
            <p className="font-semibold" data-testid="mail-subject">{m.subject}</p>
            {m.status !== 'sent' && m.lastError ? <p className="text-sm text-ink-600">Last error: {m.lastError}</p> : null}
            {bodies ? <pre className="mt-2 whitespace-pre-wrap break-all font-mono text-xs text-ink-700" data-testid="mail-text">{linkify(m.text)}</pre> : null}
          </li>
        ))}
      </ul>
    </div>
  );
}
