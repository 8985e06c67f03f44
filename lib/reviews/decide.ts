/**
 * Recording a judge's decision. A decision is a new row in `reviews` (rows are never edited) and,
 * in the same transaction, a conditional update of the entry's state: the update only applies
 * when the entry is still in the state the judge saw, so two judges deciding at the same moment
 * leave exactly one of them in effect and the other gets a 409 with the state to reload.
 * A verification also needs the entry to be `submitted` with the very inspection the entrant
 * submitted still current (a returned entry must be resubmitted first; a new G-code or a new
 * inspection after submission means the judges have not seen what would be ranked).
 */
import { Op, literal } from 'sequelize';
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

/**
 * SQL condition on `entries`: the newest inspection is the one submitted. Entries submitted before
 * that was recorded (no submitted_inspection_id) qualify only if their newest inspection is done
 * with no blocking failure. So does an entry whose newest inspection is an organizer's
 * re-inspection of the same submitted file (an `entry_reinspections` row) that passes every blocking
 * rule: the entrant changed nothing, and a rule corrected after a wrong tightening must not leave
 * the entry undecidable.
 */
const SUBMITTED_INSPECTION_CURRENT = `(
  entries.submitted_inspection_id = (SELECT MAX(i.id) FROM inspections i WHERE i.entry_id = entries.id)
  OR EXISTS (
    SELECT 1 FROM inspections i WHERE i.id = (SELECT MAX(i2.id) FROM inspections i2 WHERE i2.entry_id = entries.id)
      AND i.status = 'done' AND i.blocking_failures = 0
      AND (entries.submitted_inspection_id IS NULL OR EXISTS (SELECT 1 FROM entry_reinspections r WHERE r.inspection_id = i.id))))`;

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
  if (input.decision === 'verify' && input.expectedState !== 'submitted')
    throw conflict(`Only a submitted entry can be verified; this one is ${input.expectedState}. A returned entry comes back to the desk when its entrant submits it again.`);

  const result = await getSequelize().transaction(async (transaction) => {
    const now = new Date();
    const seasonNow = await Season.findByPk(entry.seasonId, { attributes: ['state', 'name'], transaction });
    if (seasonNow && CLOSED_SEASON_STATES.includes(seasonNow.state)) throw conflict(`The standings of ${seasonNow.name} are ${seasonNow.state}; decisions can no longer change.`);
    // Claim the entry: only succeeds while it is still in the state the judge saw (and, to verify,
    // while the inspection the entrant submitted is still the current one). On databases with row
    // locks this also serializes concurrent deciders on the same entry.
    const where = input.decision === 'verify'
      ? { id: entry.id, state: 'submitted', [Op.and]: literal(SUBMITTED_INSPECTION_CURRENT) }
      : { id: entry.id, state: input.expectedState };
    const [claimed] = await Entry.update({ state: input.expectedState }, { where, transaction });
    if (claimed !== 1) {
      const fresh = await Entry.findByPk(entry.id, { attributes: ['state'], transaction });
      if (fresh?.state === input.expectedState)
        throw new HttpError(
          409,
          'The entry’s current inspection is not the one its entrant submitted (a new G-code or a new inspection came after), so it cannot be verified as it is. Return it to the entrant, or reload to see the new report.',
          undefined,
          'inspection_changed',
        );
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
    let mailed = false;
    if (toState !== 'submitted') {
      // Queued with the decision, delivered after commit: a mail failure cannot undo or fail it.
      const [entrant, cls] = await Promise.all([User.findByPk(entry.entrantId, { transaction }), ContestClass.findByPk(entry.classId, { transaction })]);
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
          { transaction },
        );
        mailed = true;
      }
    }
    return { reviewId: review.id, fromState, toState, count, mailed };
  });

  return {
    reviewId: result.reviewId,
    entryId: entry.id,
    decision: input.decision,
    fromState: result.fromState,
    entryState: result.toState,
    verifications: { count: result.count, required },
    mailed: result.mailed,
  };
}
