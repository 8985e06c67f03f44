/**
 * The rulebook: season-wide rules plus per-class additions and overrides, stored in `rules`
 * (class_id NULL = whole season). A class rule on a metric replaces every season rule on that
 * metric for that class. Rules freeze once entries have been submitted under them, unless the
 * organizer asks for every entry to be inspected again.
 */
import { Op, type Transaction } from 'sequelize';
import { ContestClass, Entry, Rule as RuleRow, type Season } from '@/models';
import { getSequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { badRequest, HttpError } from '@/lib/errors';
import { ruleSentence, type Rule } from '@/lib/inspection/rules';
import type { RulebookInput, RulebookRule } from '@/lib/seasons/schemas';
import { managedSeason, type Actor } from '@/lib/seasons/context';
import { reinspectSeason, startQueued } from '@/lib/seasons/reinspect';
import { mergeRules } from '@/lib/seasons/rulesMerge';

/** A stored row in the engine's RuleSchema shape (what evaluateRules takes). */
export function ruleFromRow(row: RuleRow): Rule {
  const rule: Rule = { id: String(row.id), metric: row.metric as Rule['metric'], comparator: row.comparator as Rule['comparator'], value: row.value, severity: row.severity };
  if (row.valueMax !== null && row.valueMax !== undefined) rule.valueMax = row.valueMax;
  if (row.tolerance) rule.tolerance = row.tolerance;
  if (row.sentence) rule.sentence = row.sentence;
  return rule;
}

/** The rules that apply to entries of one class, in RuleSchema shape. */
export async function effectiveRules(seasonId: number, classId: number | null): Promise<Rule[]> {
  const rows = await RuleRow.findAll({
    where: classId === null ? { seasonId, classId: null } : { seasonId, [Op.or]: [{ classId: null }, { classId }] },
    order: [['position', 'ASC'], ['id', 'ASC']],
  });
  const seasonRules = rows.filter((r) => r.classId === null).map(ruleFromRow);
  const classRules = classId === null ? [] : rows.filter((r) => r.classId === classId).map(ruleFromRow);
  return mergeRules(seasonRules, classRules);
}

/** Every stored rule of a season, as the editor edits them. */
export async function rulebookRules(seasonId: number, transaction?: Transaction): Promise<(RulebookRule & { id: string })[]> {
  const rows = await RuleRow.findAll({ where: { seasonId }, order: [['position', 'ASC'], ['id', 'ASC']], transaction });
  const seasonFirst = [...rows.filter((r) => r.classId === null), ...rows.filter((r) => r.classId !== null)];
  return seasonFirst.map((r) => ({ ...ruleFromRow(r), id: String(r.id), classId: r.classId ?? null }));
}

/**
 * Entries ever submitted to the season (a withdrawn entry that was submitted counts: it was
 * printed and inspected under the rules as they were). Drafts do not freeze anything.
 */
export async function submittedEntryCount(seasonId: number, transaction?: Transaction): Promise<number> {
  return Entry.count({
    where: { seasonId, [Op.or]: [{ state: { [Op.notIn]: ['draft', 'withdrawn'] } }, { submittedAt: { [Op.ne]: null } }] },
    transaction,
  });
}

type RulesFreeze = { reason: string; reinspectAllowed: boolean };

/** Why the rulebook cannot change right now, or null. `reinspectAllowed` says whether re-inspecting lifts it. */
export async function rulesFreeze(season: Season, transaction?: Transaction): Promise<RulesFreeze | null> {
  if (season.state === 'final' || season.state === 'archived') return freezeOf(season, 0);
  return freezeOf(season, await submittedEntryCount(season.id, transaction));
}

/** rulesFreeze for a caller that has already counted the season's submitted entries. */
export function freezeOf(season: Season, submitted: number): RulesFreeze | null {
  if (season.state === 'final' || season.state === 'archived')
    return { reason: `The season is ${season.state}: its rulebook is frozen with its standings.`, reinspectAllowed: false };
  if (submitted > 0)
    return {
      reason: `The rules are frozen: ${submitted} ${submitted === 1 ? 'entry has' : 'entries have'} been submitted under them. To change them anyway, choose to re-inspect every entry under the new rules.`,
      reinspectAllowed: true,
    };
  return null;
}

export async function saveRulebook(actor: Actor, seasonId: number, input: RulebookInput) {
  const result = await getSequelize().transaction(async (transaction) => {
    const season = await managedSeason(seasonId, transaction, actor);
    const freeze = await rulesFreeze(season, transaction);
    if (freeze && !(freeze.reinspectAllowed && input.reinspect)) throw new HttpError(409, freeze.reason, undefined, 'rules_frozen');
    const classIds = new Set((await ContestClass.findAll({ where: { seasonId }, attributes: ['id'], transaction })).map((c) => c.id));
    const fields: Record<string, string> = {};
    input.rules.forEach((r, i) => {
      if (r.classId !== null && !classIds.has(r.classId)) fields[`rules.${i}.classId`] = 'That class is not part of this season.';
    });
    if (Object.keys(fields).length) throw badRequest('A rule points at a class of another season.', fields);

    const before = await RuleRow.count({ where: { seasonId }, transaction });
    await RuleRow.destroy({ where: { seasonId }, transaction });
    const position = new Map<number | null, number>();
    const rows = input.rules.map((r) => {
      const p = position.get(r.classId) ?? 0;
      position.set(r.classId, p + 1);
      const { classId, ...rule } = r;
      return {
        seasonId,
        classId,
        metric: rule.metric,
        comparator: rule.comparator,
        value: rule.value,
        valueMax: rule.comparator === 'between' ? (rule.valueMax ?? null) : null,
        tolerance: rule.tolerance ?? 0,
        severity: rule.severity,
        // The sentence shown everywhere: the organizer's own words, or the generated one.
        sentence: rule.sentence?.trim() || ruleSentence({ ...rule, sentence: undefined }),
        position: p,
      };
    });
    await RuleRow.bulkCreate(rows, { transaction });
    await audit('season.rules_saved', { type: 'season', id: seasonId }, {
      actorId: actor.user.id, ip: actor.ip, transaction,
      details: { before, after: rows.length, reinspect: !!freeze },
    });
    let reinspection = null;
    if (freeze) {
      reinspection = await reinspectSeason(seasonId, { transaction });
      await audit('season.reinspect_requested', { type: 'season', id: seasonId }, {
        actorId: actor.user.id, ip: actor.ip, transaction, details: { reason: 'rules changed', queued: reinspection.queued },
      });
    } else {
      // Nothing submitted yet, but drafts were inspected under the old rules: check them again so
      // a draft that now fails a blocking rule cannot be submitted on its old report.
      reinspection = await reinspectSeason(seasonId, { transaction, states: ['draft', 'returned'], markSeason: false });
      if (!reinspection.queued) reinspection = null;
    }
    return { saved: rows.length, reinspection };
  });
  startQueued(result.reinspection);
  return { ...result, rules: await rulebookRules(seasonId) };
}
