/**
 * The two-judge rule. A season may require N distinct verifying judges before an entry counts
 * (seasons.verifications_required). Verifications are counted within the current round: reviews
 * after the entry's latest submission and after the latest reject/return decision, so a verify
 * from before a resubmission or before a rejection never counts twice.
 */
export interface ReviewLike {
  judgeId: number;
  decision: string;
  createdAt: Date;
}

export function roundStart(reviews: readonly ReviewLike[], submittedAt: Date | null): number {
  let start = submittedAt ? submittedAt.getTime() : 0;
  for (const r of reviews) if (r.decision !== 'verify' && r.createdAt.getTime() >= start) start = r.createdAt.getTime();
  return start;
}

/** Distinct judges who verified in the current round. */
export function roundVerifiers(reviews: readonly ReviewLike[], submittedAt: Date | null): number[] {
  const start = roundStart(reviews, submittedAt);
  const ids = new Set<number>();
  for (const r of reviews) {
    // A verify written in the same millisecond as the round's start still belongs to it (>=).
    if (r.decision === 'verify' && r.createdAt.getTime() >= start) ids.add(r.judgeId);
  }
  return [...ids];
}

/** How many verifications the season requires, never fewer than one. */
export function requiredVerifications(seasonSetting: number | null | undefined): number {
  return Math.max(1, Math.floor(Number(seasonSetting) || 1));
}

/**
 * When the entry's current round began: its latest submission, or later, when a re-inspection sent
 * it back to the judges (verifications given before that were given on the earlier inspection).
 */
export function roundOpenedAt(entry: { submittedAt: Date | null; reopenedAt?: Date | null }): Date | null {
  const a = entry.submittedAt;
  const b = entry.reopenedAt ?? null;
  return a && b ? (b.getTime() > a.getTime() ? b : a) : (a ?? b);
}
