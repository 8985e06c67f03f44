/**
 * The rulebook an entry is inspected against: the season's rules, with the class's own rules
 * added — a class rule on a metric the season also rules on replaces the season's.
 * TODO(switch): use effectiveRules(seasonId, classId) from lib/seasons once the organizer side
 * exports it; this is the one place that reads the rules table for entries.
 */
import { Op } from 'sequelize';
import { Rule as RuleRow } from '@/models';
import { RuleSchema, type Rule } from '@/lib/inspection/rules';

export async function rulesForEntry(seasonId: number, classId: number): Promise<Rule[]> {
  const rows = await RuleRow.findAll({
    where: { seasonId, [Op.or]: [{ classId: null }, { classId }] },
    order: [['position', 'ASC'], ['id', 'ASC']],
  });
  const classMetrics = new Set(rows.filter((r) => r.classId !== null).map((r) => r.metric));
  const out: Rule[] = [];
  for (const r of rows) {
    if (r.classId === null && classMetrics.has(r.metric)) continue;
    const parsed = RuleSchema.safeParse({
      id: String(r.id),
      metric: r.metric,
      comparator: r.comparator,
      value: r.value,
      ...(r.valueMax !== null ? { valueMax: r.valueMax } : {}),
      tolerance: r.tolerance,
      severity: r.severity,
      ...(r.sentence ? { sentence: r.sentence } : {}),
    });
    // A stored rule the engine no longer understands is skipped rather than failing every entry.
    if (parsed.success) out.push(parsed.data);
  }
  return out;
}
