/**
 * What the browser's rulebook check needs from the server: each class's effective rules (the
 * season's rules with the class's overrides, lib/seasons/rulebook effectiveRules — the same rules
 * an entry's inspection is checked against) and the rule context (test-piece size). Public: any
 * season past its draft, as its rulebook page.
 */
import { notFound } from '@/lib/errors';
import { effectiveRules } from '@/lib/seasons/rulebook';
import { publicSeason } from '@/lib/seasons/view';
import type { Rule } from '@/lib/inspection/rules';
import type { MetricContext } from '@/lib/inspection/metrics';

export interface CheckRulebook {
  season: { slug: string; name: string; state: string };
  /** Season context for rule metrics, as the server's inspection gets it. */
  ruleContext: MetricContext;
  /** Rules for every class (no class chosen yet), then each class's effective rules. */
  seasonRules: Rule[];
  classes: { id: number; slug: string; name: string; rules: Rule[] }[];
}

export async function checkRulebook(slug: string): Promise<CheckRulebook> {
  const view = await publicSeason(slug);
  if (!view) throw notFound('No public season has this address.');
  const { season, classes, testPiece } = view;
  const [seasonRules, ...perClass] = await Promise.all([effectiveRules(season.id, null), ...classes.map((c) => effectiveRules(season.id, c.id))]);
  return {
    season: { slug: season.slug, name: season.name, state: season.state },
    ruleContext: testPiece ? { testPieceSizeMm: { x: testPiece.sizeXMm, y: testPiece.sizeYMm, z: testPiece.sizeZMm } } : {},
    seasonRules,
    classes: classes.map((c, i) => ({ id: c.id, slug: c.slug, name: c.name, rules: perClass[i] })),
  };
}
