/**
 * What a finished re-inspection does to an entry. Called once per stored report (by the inspection
 * storage path in lib/entries/inspection.ts); a no-op for an entry's first inspection.
 *
 * - A verified entry whose new inspection fails a blocking rule (or raises a blocking flag) leaves
 *   the standings at once: it goes back to `submitted` (conditional update, so a decision made at
 *   the same moment is not overwritten), a new round of verifications starts (`reopenedAt`), the
 *   judges see what changed rule by rule, and the entrant is told by mail.
 * - Every other entry keeps its state; drafts and returned entries simply carry the new report, so
 *   a draft that now fails a blocking rule cannot be submitted (submission reads the latest one).
 * - Either way an `entry_reinspections` row records the outcome and the changed rule results: the
 *   public entry page words what happened from it, never more.
 */
import { Op } from 'sequelize';
import { ContestClass, Entry, EntryReinspection, Inspection, Season, User } from '@/models';
import type { RuleChange } from '@/models/EntryReinspection';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { appUrl, linkMail, sendMail } from '@/lib/mail';
import { ruleRows } from './diff';

/** Per rule, the old and the new result where anything changed (status, measured value or the rule itself). */
export function ruleChanges(previous: unknown, latest: unknown): RuleChange[] {
  const a = ruleRows(previous);
  const b = ruleRows(latest);
  const out: RuleChange[] = [];
  for (const key of new Set([...a.keys(), ...b.keys()])) {
    const x = a.get(key);
    const y = b.get(key);
    if (x && y && x.status === y.status && x.sentence === y.sentence && JSON.stringify(x.measured) === JSON.stringify(y.measured)) continue;
    const now = (y ?? x)!;
    out.push({
      metric: now.metric,
      sentence: now.sentence,
      sentenceBefore: x && y && x.sentence !== y.sentence ? x.sentence : null,
      severity: now.severity,
      before: x?.status ?? null,
      after: y?.status ?? null,
      measuredBefore: x?.measured ?? null,
      measuredAfter: y?.measured ?? null,
    });
  }
  return out;
}

/** Did the rulebook itself change between the two inspections (a rule added, removed or reworded)? */
export const rulebookChanged = (changes: readonly RuleChange[]) => changes.some((c) => c.before === null || c.after === null || c.sentenceBefore !== null);

/** A one-line account of one rule's change, for the judges and the entrant's mail. */
export function changeSentence(c: RuleChange): string {
  const was = c.before === null ? 'not in the earlier rulebook' : c.before;
  const now = c.after === null ? 'no longer in the rulebook' : c.after;
  const measured = c.measuredAfter !== null && c.measuredAfter !== undefined ? ` (measured ${JSON.stringify(c.measuredAfter)})` : '';
  return `${c.sentence} [${c.severity}]: ${was} → ${now}${measured}${c.sentenceBefore ? `; the rule was “${c.sentenceBefore}”` : ''}`;
}

/** Never throws: a failure here is logged and must not mark the stored inspection as failed. */
export async function afterInspectionStored(inspectionId: number): Promise<void> {
  try {
    await applyReinspection(inspectionId);
  } catch (err) {
    console.error(`Re-inspection outcome of inspection ${inspectionId} failed:`, err);
  }
}

async function applyReinspection(inspectionId: number): Promise<void> {
  const row = await Inspection.findByPk(inspectionId);
  if (!row || row.status !== 'done') return;
  const previous = await Inspection.findOne({ where: { entryId: row.entryId, status: 'done', id: { [Op.lt]: row.id } }, order: [['id', 'DESC']] });
  if (!previous) return;
  const entry = await Entry.findByPk(row.entryId);
  if (!entry || entry.state === 'withdrawn') return;
  const changes = ruleChanges(previous.ruleResults, row.ruleResults);
  const now = new Date();

  const moved = await getSequelize().transaction(async (transaction) => {
    // The state as it is under the write lock: a judge may have decided since the read above, and
    // the record (and the public wording built from it) must say what really happened.
    const fromState = (await Entry.findByPk(entry.id, { attributes: ['state'], transaction }))?.state ?? entry.state;
    let toState = fromState;
    if (fromState === 'submitted' && row.blockingFailures > 0 && previous.blockingFailures === 0) {
      // Still with the judges, but verifications given on the passing inspection no longer count.
      await Entry.update({ reopenedAt: now }, { where: { id: entry.id, state: 'submitted' }, transaction });
    }
    if (fromState === 'verified' && row.blockingFailures > 0) {
      const [n] = await Entry.update({ state: 'submitted', decidedAt: null, reopenedAt: now }, { where: { id: entry.id, state: 'verified' }, transaction });
      if (n === 1) toState = 'submitted';
    }
    const [, created] = await EntryReinspection.findOrCreate({
      where: { inspectionId: row.id },
      defaults: { entryId: entry.id, inspectionId: row.id, previousInspectionId: previous.id, fromState, toState, changes },
      transaction,
    });
    if (created && fromState !== toState) {
      await audit('entry.reopened_by_reinspection', { type: 'entry', id: entry.id }, {
        transaction,
        details: { inspectionId: row.id, previousInspectionId: previous.id, blockingFailures: row.blockingFailures, fromState, toState, changed: changes.map((c) => c.metric) },
      });
    }
    return created && fromState !== toState;
  });
  if (moved) await mailEntrant(entry, changes);
}

async function mailEntrant(entry: Entry, changes: RuleChange[]) {
  // After the commit: a mail failure never undoes the move (it is logged instead).
  try {
    const [entrant, season, cls] = await Promise.all([User.findByPk(entry.entrantId), Season.findByPk(entry.seasonId), ContestClass.findByPk(entry.classId)]);
    if (!entrant || !season) return;
    const failing = changes.filter((c) => c.after === 'fail' && c.severity === 'blocking');
    const lines = (failing.length ? failing : changes).map(changeSentence);
    await sendMail(
      linkMail(
        entrant.email,
        `Your ${season.name} entry #${entry.id} is back with the judges`,
        `Hello ${entrant.name}, your verified entry #${entry.id} in ${season.name}${cls ? ` (${cls.name})` : ''} was inspected again ${rulebookChanged(changes) ? 'after the rulebook changed' : 'on the organizer’s request'}, and the new inspection fails a blocking rule. It has left the standings and is back with the judges, who will decide on it again.` +
          (lines.length ? ` What changed: ${lines.join(' · ')}.` : ''),
        'Your entry',
        appUrl(`/me/entries/${entry.id}`),
        'You do not need to do anything now; the judges may return the entry to you if it needs a change.',
      ),
    );
  } catch (err) {
    console.error(`Re-inspection mail for entry ${entry.id} failed:`, err);
  }
}

/** The latest re-inspection outcome of an entry, for the review desk and the public page. */
export async function latestReinspection(entryId: number) {
  const r = await EntryReinspection.findOne({ where: { entryId }, order: [['id', 'DESC']] });
  if (!r) return null;
  return {
    at: r.createdAt.toISOString(),
    fromState: r.fromState,
    toState: r.toState,
    reopened: r.fromState === 'verified' && r.toState === 'submitted',
    rulebookChanged: rulebookChanged(r.changes),
    changes: r.changes.map((c) => ({ ...c, text: changeSentence(c) })),
  };
}
