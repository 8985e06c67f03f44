/**
 * Recording a judge's decision. A decision is a new row in `reviews` (rows are never edited) and,
 * in the same transaction, a conditional update of the entry's state: the update only applies
 * when the entry is still in the state the judge saw, so two judges deciding at the same moment
 * leave exactly one of them in effect and the other gets a 409 with the state to reload.
 */
import { ContestClass, Entry, Review, Season, User } from '@/models';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { sendMail } from '@/lib/mail';
import { HttpError, conflict, forbidden } from '@/lib/errors';
import type { EntryState, ReviewDecision } from '@/lib/domain';
import { entryForJudge } from './access';
import { refuseConflictedJudge } from './conflicts';
import { requiredVerifications, roundOpenedAt, roundVerifiers } from './round';
import { decisionMail } from './mail';
import type { DecisionInput } from './schemas';

/** Seasons whose standings are frozen take no new decisions. */
const CLOSED_SEASON_STATES = ['final', 'archived'];

/** Where an entrant reads their entry (linked from the e-mail). */
export const entrantEntryPath = (entryId: number) => `/me/entries/${entryId}`;

export interface DecisionResult {
  reviewId: number;
  entryId: number;
  decision: ReviewDecision;
  fromState: EntryState;
  entryState: EntryState;
  verifications: { count: number; required: number };
  mailed: boolean;
}

export async function decide(judgeId: number, entryId: number, input: DecisionInput, meta: { ip?: string | null } = {}): Promise<DecisionResult> {
  const entry = await entryForJudge(judgeId, entryId);
  if (entry.entrantId === judgeId) throw forbidden('You cannot decide on your own entry; another judge of the season will.');
  const season = await Season.findByPk(entry.seasonId);
  if (!season) throw new HttpError(404, 'No entry with this number is on your review desk.');
  if (CLOSED_SEASON_STATES.includes(season.state)) throw conflict(`The standings of ${season.name} are ${season.state}; decisions can no longer change.`);
  const required = requiredVerifications(season.verificationsRequired);

  const result = await getSequelize().transaction(async (transaction) => {
    const now = new Date();
    // Claim the entry: only succeeds while it is still in the state the judge saw. On databases with
    // row locks this also serializes concurrent deciders on the same entry.
    const [claimed] = await Entry.update({ state: input.expectedState }, { where: { id: entry.id, state: input.expectedState }, transaction });
    if (claimed !== 1) {
      const fresh = await Entry.findByPk(entry.id, { attributes: ['state'], transaction });
      throw new HttpError(
        409,
        `This entry is now ${fresh?.state ?? 'gone'}, not ${input.expectedState}: another judge decided a moment ago. Reload to see the latest decision.`,
        undefined,
        'state_changed',
      );
    }
    const current = (await Entry.findByPk(entry.id, { transaction }))!;
    await refuseConflictedJudge(judgeId, current, transaction);
    const fromState = current.state as EntryState;
    const reviews = await Review.findAll({ where: { entryId: entry.id }, attributes: ['judgeId', 'decision', 'createdAt'], transaction });
    let toState: EntryState;
    let count = 0;
    if (input.decision === 'verify') {
      if (fromState === 'verified') throw conflict('This entry is already verified.');
      const verifiers = roundVerifiers(reviews, roundOpenedAt(current));
      if (verifiers.includes(judgeId)) throw conflict(`You already verified this entry; the season needs ${required} different judges to verify it.`);
      count = verifiers.length + 1;
      toState = count >= required ? 'verified' : 'submitted';
    } else {
      toState = input.decision === 'reject' ? 'rejected' : 'returned';
    }
    if (fromState === toState && input.decision !== 'verify') throw conflict(`This entry is already ${toState}.`);
    const decided = toState !== 'submitted';
    await Entry.update({ state: toState, decidedAt: decided ? now : current.decidedAt }, { where: { id: entry.id }, transaction });
    const review = await Review.create(
      { entryId: entry.id, judgeId, decision: input.decision, reasonCodes: input.reasonCodes, note: input.note, checklist: input.checklist },
      { transaction },
    );
    await audit('review.decided', { type: 'entry', id: entry.id }, {
      actorId: judgeId,
      ip: meta.ip ?? null,
      transaction,
      details: { reviewId: review.id, decision: input.decision, reasonCodes: input.reasonCodes, fromState, toState, verifications: count, verificationsRequired: required },
    });
    return { reviewId: review.id, fromState, toState, count };
  });

  let mailed = false;
  if (result.toState !== 'submitted') {
    // Mail after the commit: a mail failure must not undo a decision, and is logged instead.
    try {
      const [entrant, cls] = await Promise.all([User.findByPk(entry.entrantId), ContestClass.findByPk(entry.classId)]);
      if (entrant) {
        await sendMail(
          decisionMail({
            to: entrant.email,
            entrantName: entrant.name,
            entryId: entry.id,
            seasonName: season.name,
            className: cls?.name ?? '',
            decision: input.decision,
            reasonCodes: input.reasonCodes,
            note: input.note,
            entryPath: entrantEntryPath(entry.id),
          }),
        );
        mailed = true;
      }
    } catch (err) {
      console.error(`Decision mail for entry ${entry.id} failed:`, err);
    }
  }
  return {
    reviewId: result.reviewId,
    entryId: entry.id,
    decision: input.decision,
    fromState: result.fromState,
    entryState: result.toState,
    verifications: { count: result.count, required },
    mailed,
  };
}
