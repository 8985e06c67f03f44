/**
 * Season lifecycle: draft → open → judging → final → archived, one step at a time, each with the
 * guards a contest runner needs. Every transition is audited and may mail the subscribers.
 */
import { ContestClass, Entry, TestPiece, type Season } from '@/models';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError } from '@/lib/errors';
import { SEASON_STATES, type SeasonState } from '@/lib/domain';
import type { TransitionInput } from '@/lib/seasons/schemas';
import { managedSeason, type Actor } from '@/lib/seasons/context';
import { notifySubscribers } from '@/lib/seasons/subscriptions';
import { reinspectSeason, startQueued } from '@/lib/seasons/reinspect';
import { freezeStandings } from '@/lib/standings/freeze';
import { submittedEntryCount } from '@/lib/seasons/rulebook';

/** The one state each state may move to. */
export const NEXT_STATE: Record<SeasonState, SeasonState | null> = {
  draft: 'open',
  open: 'judging',
  judging: 'final',
  final: 'archived',
  archived: null,
};

/** Reasons the season cannot move to `to` now; empty when it can. `known`: the season's test piece and classes when the caller has read them already. */
export async function transitionBlockers(season: Season, to: SeasonState, known?: { testPiece: TestPiece | null; classes: readonly ContestClass[] }): Promise<string[]> {
  const next = NEXT_STATE[season.state as SeasonState];
  if (to !== next)
    return [next
      ? `The season is ${season.state}; it can only move on to ${next} (states go ${SEASON_STATES.join(' → ')}).`
      : `The season is ${season.state}; nothing follows that state.`];
  const reasons: string[] = [];
  if (to === 'open') {
    const hasTestPiece = known ? !!known.testPiece : (await TestPiece.count({ where: { seasonId: season.id } })) > 0;
    const classCount = known ? known.classes.length : await ContestClass.count({ where: { seasonId: season.id } });
    if (!hasTestPiece) reasons.push('it has no test piece yet: upload the STL everyone prints');
    if (!classCount) reasons.push('it has no class yet: add at least one class');
  }
  if (to === 'final') {
    const waiting = await Entry.count({ where: { seasonId: season.id, state: 'submitted' } });
    if (waiting) reasons.push(`${waiting} ${waiting === 1 ? 'entry still waits' : 'entries still wait'} for review: decide them before publishing final standings`);
  }
  return reasons.length ? [`The season cannot move to ${to}: ${reasons.join('; ')}.`] : [];
}

export async function transitionSeason(actor: Actor, seasonId: number, input: TransitionInput) {
  const season = await getSequelize().transaction(async (transaction) => {
    const s = await managedSeason(seasonId, transaction);
    const blockers = await transitionBlockers(s, input.to);
    if (blockers.length) throw new HttpError(409, blockers[0], undefined, 'transition_refused');
    const from = s.state;
    const now = new Date();
    await s.update(
      {
        state: input.to,
        ...(input.to === 'final' ? { standingsFrozenAt: now, rulesFrozenAt: s.rulesFrozenAt ?? now } : {}),
      },
      { transaction },
    );
    // The standings snapshot is taken in the same transaction: final means frozen, or nothing.
    const frozen = input.to === 'final' ? await freezeStandings(s.id, transaction) : null;
    await audit('season.state_changed', { type: 'season', id: s.id }, {
      actorId: actor.user.id, ip: actor.ip, transaction, details: { from, to: input.to, notify: input.notify, ...(frozen ? { standingsRows: frozen.rows } : {}) },
    });
    return s;
  });
  // Mail after the commit: a mail server hiccup must not undo the transition.
  const notified = input.notify ? await notifySubscribers(season, input.note) : 0;
  return { season, notified };
}

/** The organizer's explicit "inspect every entry again" (e.g. after an engine update). */
export async function requestReinspection(actor: Actor, seasonId: number) {
  const result = await getSequelize().transaction(async (transaction) => {
    const season = await managedSeason(seasonId, transaction);
    if (season.state === 'final' || season.state === 'archived')
      throw new HttpError(409, `The season is ${season.state}: its standings are frozen, so its entries are not inspected again.`, undefined, 'standings_frozen');
    const submitted = await submittedEntryCount(seasonId, transaction);
    const result = await reinspectSeason(seasonId, { transaction });
    await audit('season.reinspect_requested', { type: 'season', id: seasonId }, {
      actorId: actor.user.id, ip: actor.ip, transaction, details: { reason: 'organizer request', submitted, queued: result.queued, withoutFile: result.withoutFile },
    });
    return result;
  });
  startQueued(result);
  return result;
}
