/** Reading a season for a page: the public view (classes, test piece, rulebook) and the organizer's view. */
import { Op } from 'sequelize';
import { Rule, Season, TestPiece } from '@/models';
import type { SeasonState } from '@/lib/domain';
import { managedSeason, type Actor } from '@/lib/seasons/context';
import { seasonOrganizers } from '@/lib/seasons/organizers';
import { seasonJson } from '@/lib/seasons/editor';
import { testPieceJson } from '@/lib/seasons/testPiece';
import { classJson, seasonClasses } from '@/lib/seasons/classes';
import { rulebookRules, freezeOf, submittedEntryCount } from '@/lib/seasons/rulebook';
import { NEXT_STATE, transitionBlockers } from '@/lib/seasons/lifecycle';
import { seasonJudges } from '@/lib/seasons/judges';
import { subscriberCount } from '@/lib/seasons/subscriptions';
import { organizerDashboard } from '@/lib/seasons/dashboard';

/** Public view of one season (null for a draft or an unknown slug): classes, test piece and rulebook. */
export async function publicSeason(slug: string) {
  const season = await Season.findOne({ where: { slug, state: { [Op.ne]: 'draft' } } });
  if (!season) return null;
  const [classes, rules, testPiece] = await Promise.all([
    seasonClasses(season.id),
    Rule.findAll({ where: { seasonId: season.id }, order: [['classId', 'ASC'], ['position', 'ASC'], ['id', 'ASC']] }),
    TestPiece.findOne({ where: { seasonId: season.id } }),
  ]);
  return { season, classes, rules, testPiece };
}

/** Everything the organizer's season page and its GET route show, in one plain object. */
export async function organizerSeasonView(actor: Pick<Actor, 'user'>, seasonId: number) {
  const season = await managedSeason(seasonId, undefined, actor);
  const next = NEXT_STATE[season.state as SeasonState];
  const testPieceRead = TestPiece.findOne({ where: { seasonId } });
  const classesRead = seasonClasses(seasonId);
  const [testPiece, classes, rules, judges, subscribers, [dashboard], blockers, submittedEntries, organizers] = await Promise.all([
    testPieceRead,
    classesRead,
    rulebookRules(seasonId),
    seasonJudges(seasonId),
    subscriberCount(seasonId),
    organizerDashboard({ seasonId }),
    next ? Promise.all([testPieceRead, classesRead]).then(([t, c]) => transitionBlockers(season, next, { testPiece: t, classes: c })) : Promise.resolve([] as string[]),
    submittedEntryCount(seasonId),
    seasonOrganizers(season),
  ]);
  return {
    season: seasonJson(season),
    testPiece: testPieceJson(testPiece),
    classes: classes.map(classJson),
    rules,
    freeze: freezeOf(season, submittedEntries),
    ...judges,
    subscribers,
    submittedEntries,
    organizers,
    dashboard,
    next: next ? { to: next, blockers } : null,
  };
}
export type OrganizerSeasonView = Awaited<ReturnType<typeof organizerSeasonView>>;
