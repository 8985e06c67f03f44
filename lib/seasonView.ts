/** Public view of one season: classes, test piece and rulebook. */
import { Op } from 'sequelize';
import { ContestClass, Rule, Season, TestPiece } from '@/models';

export async function publicSeason(slug: string) {
  const season = await Season.findOne({ where: { slug, state: { [Op.ne]: 'draft' } } });
  if (!season) return null;
  const [classes, rules, testPiece] = await Promise.all([
    ContestClass.findAll({ where: { seasonId: season.id }, order: [['displayOrder', 'ASC'], ['id', 'ASC']] }),
    Rule.findAll({ where: { seasonId: season.id }, order: [['classId', 'ASC'], ['position', 'ASC'], ['id', 'ASC']] }),
    TestPiece.findOne({ where: { seasonId: season.id } }),
  ]);
  return { season, classes, rules, testPiece };
}
