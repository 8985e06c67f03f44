/** The e-mail an entrant gets when a judge's decision changes their entry's state. */
import { appUrl, type MailMessage } from '@/lib/mail';
import type { ReviewDecision } from '@/lib/domain';
import { reasonLabel, DECISION_LABELS } from './reasons';

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export function decisionMail(opts: {
  to: string;
  entrantName: string;
  entryId: number;
  seasonName: string;
  className: string;
  decision: ReviewDecision;
  reasonCodes: readonly string[];
  note: string;
  entryPath: string;
}): MailMessage {
  const past = DECISION_LABELS[opts.decision].past;
  const subject = `Your ${opts.seasonName} entry #${opts.entryId} was ${past}`;
  const reasons = opts.reasonCodes.map(reasonLabel);
  const next =
    opts.decision === 'verify'
      ? 'It now counts in the standings of its class.'
      : opts.decision === 'return'
        ? 'You can change the entry and submit it again.'
        : 'A rejected entry does not count in the standings. You may submit a new entry while the season is open.';
  const link = appUrl(opts.entryPath);
  const text = [
    `Hello ${opts.entrantName},`,
    '',
    `a judge ${past} your entry #${opts.entryId} in ${opts.seasonName} (${opts.className}).`,
    '',
    'Reasons:',
    ...reasons.map((r) => `- ${r}`),
    '',
    'Judge’s note:',
    opts.note,
    '',
    next,
    '',
    `Your entry: ${link}`,
    '',
    '— Hotlap',
  ].join('\n');
  const html =
    `<p>Hello ${esc(opts.entrantName)},</p>` +
    `<p>a judge ${esc(past)} your entry #${opts.entryId} in ${esc(opts.seasonName)} (${esc(opts.className)}).</p>` +
    `<p><strong>Reasons:</strong></p><ul>${reasons.map((r) => `<li>${esc(r)}</li>`).join('')}</ul>` +
    `<p><strong>Judge’s note:</strong><br>${esc(opts.note).replace(/\n/g, '<br>')}</p>` +
    `<p>${esc(next)}</p><p><a href="${esc(link)}">Your entry</a></p><p>— Hotlap</p>`;
  return { to: opts.to, subject, text, html };
}
