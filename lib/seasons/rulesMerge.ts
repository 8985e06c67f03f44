/**
 * Season rules with a class's own rules applied: a class rule on a metric replaces every season
 * rule on that metric for that class; the class's other rules are added after the season's.
 * Pure, so the entrant, judging and public sides all merge the same way.
 */
export function mergeRules<R extends { metric: string }>(seasonRules: readonly R[], classRules: readonly R[]): R[] {
  const overridden = new Set(classRules.map((r) => r.metric));
  return [...seasonRules.filter((r) => !overridden.has(r.metric)), ...classRules];
}
