/**
 * The rulebook an entry is inspected against: the season's rules with the class's additions and
 * overrides, as the organizer side defines them (lib/seasons/rulebook effectiveRules).
 * Loaded lazily: lib/seasons re-inspects through lib/entries, so a static import would be a cycle.
 */
import type { Rule } from '@/lib/inspection/rules';

export async function rulesForEntry(seasonId: number, classId: number): Promise<Rule[]> {
  const { effectiveRules } = await import('@/lib/seasons/rulebook');
  return effectiveRules(seasonId, classId);
}
