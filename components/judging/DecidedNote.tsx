import Link from 'next/link';
import { DECISION_LABELS } from '@/lib/reviews/reasons';
import type { ReviewDecision } from '@/lib/domain';
import type { ownLatestDecision } from '@/lib/reviews/queue';

/** The note on the entry a judge lands on after deciding the previous one, read back from the database. */
export function DecidedNote({ d }: { d: NonNullable<Awaited<ReturnType<typeof ownLatestDecision>>> }) {
  const past = DECISION_LABELS[d.decision as ReviewDecision]?.past ?? d.decision;
  return (
    <p role="status" className="rounded-lg bg-coolant-50 p-3 text-coolant-700" data-testid="decision-result">
      {d.decision === 'verify' && d.entryState === 'submitted'
        ? `Your verification of entry #${d.entryId} is recorded; another judge must verify it before it counts.`
        : `You ${past} entry #${d.entryId}: it is now ${d.entryState}. The entrant has been e-mailed.`}{' '}
      <Link href={`/judging/entries/${d.entryId}`}>Open #{d.entryId} again</Link>
    </p>
  );
}

