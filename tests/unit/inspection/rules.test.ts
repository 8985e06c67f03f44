import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { compare, evaluateRules, ruleSentence, RuleSchema, RulebookSchema, settingsMismatchFlags, type Rule, type RuleResult } from '@/lib/inspection/rules';
import { METRICS, METRIC_IDS, metricById, type MetricReport } from '@/lib/inspection/metrics';
import { FLAG_CODES } from '@/lib/inspection/plausibility';
import type { SettingsEvidence } from '@/lib/inspection/types';

const rule = (r: Partial<Rule> & Pick<Rule, 'metric' | 'comparator' | 'value'>): Rule => RuleSchema.parse({ severity: 'blocking', ...r });

function evidence(over: Partial<Record<keyof SettingsEvidence, [number | null, number | null]>> = {}): SettingsEvidence {
  const base: Record<keyof SettingsEvidence, [number | null, number | null]> = {
    infill_percent: [15, 15.2],
    walls: [2, 2],
    top_layers: [4, 4],
    bottom_layers: [4, 4],
    layer_height_mm: [0.2, 0.2],
    nozzle_mm: [0.4, 0.4],
    ...over,
  };
  return Object.fromEntries(Object.entries(base).map(([k, [d, m]]) => [k, { declared: d, measured: m }])) as unknown as SettingsEvidence;
}

/** The demo season's rulebook: 15 % infill, 2 walls, 4 top / 4 bottom, 0.20–0.30 mm layers,
 * one object, 100 % ± 1 % scale, no overrides. */
const DEMO_RULEBOOK = [
  { metric: 'infill_percent', comparator: 'eq', value: 15, tolerance: 2, severity: 'blocking' },
  { metric: 'walls', comparator: 'eq', value: 2, severity: 'blocking' },
  { metric: 'top_layers', comparator: 'eq', value: 4, severity: 'blocking' },
  { metric: 'bottom_layers', comparator: 'eq', value: 4, severity: 'blocking' },
  { metric: 'layer_height_mm', comparator: 'between', value: 0.2, valueMax: 0.3, severity: 'blocking' },
  { metric: 'objects', comparator: 'eq', value: 1, severity: 'blocking' },
  { metric: 'scale_percent', comparator: 'eq', value: 100, tolerance: 1, severity: 'blocking' },
  { metric: 'feed_override_percent_max', comparator: 'eq', value: 100, severity: 'advisory' },
  { metric: 'flow_override_percent_max', comparator: 'eq', value: 100, severity: 'advisory' },
  { metric: 'settings_mismatch', comparator: 'eq', value: 0, severity: 'advisory' },
];

/** A report shaped like the engine's JSON output (lib/inspection/report.ts toJsonReport). */
function report(over: Partial<MetricReport> = {}): MetricReport {
  return {
    filament: { length_mm: 4819.9, volume_mm3: 11592.6, mass_g: 14.375 },
    flow: { peak_mm3s: 24.1, p95_mm3s: 18.2, mean_mm3s: 9.9 },
    layers: { count: 200, height_mm: 0.2, first_height_mm: 0.2 },
    size_mm: { x: 36, y: 39, z: 40 },
    objects: 1,
    time: { estimated_s: 1400 },
    overrides: { feed_percent_max: null, flow_percent_max: null },
    settings: evidence(),
    ...over,
  };
}

describe('compare: every comparator and its tolerance edges', () => {
  // Semantics defined in rules.ts: tolerance widens each bound in the entrant's favour; lt/gt stay strict.
  const cases: [Rule['comparator'], number, number | undefined, number | undefined, number, boolean][] = [
    ['lt', 10, undefined, undefined, 9.99, true],
    ['lt', 10, undefined, undefined, 10, false],
    ['lt', 10, undefined, 1, 10.5, true],
    ['lt', 10, undefined, 1, 11, false],
    ['lte', 10, undefined, undefined, 10, true],
    ['lte', 10, undefined, undefined, 10.01, false],
    ['lte', 10, undefined, 0.5, 10.5, true],
    ['eq', 15, undefined, 1, 16, true],
    ['eq', 15, undefined, 1, 14, true],
    ['eq', 15, undefined, 1, 16.01, false],
    ['eq', 2, undefined, undefined, 2, true],
    ['eq', 2, undefined, undefined, 3, false],
    ['ne', 100, undefined, undefined, 100, false],
    ['ne', 100, undefined, undefined, 101, true],
    ['ne', 100, undefined, 2, 101, false],
    ['gte', 4, undefined, undefined, 4, true],
    ['gte', 4, undefined, undefined, 3.99, false],
    ['gt', 4, undefined, undefined, 4, false],
    ['gt', 4, undefined, undefined, 4.01, true],
    ['gt', 4, undefined, 1, 3.5, true],
    ['gt', 4, undefined, 1, 3, false],
    ['between', 0.2, 0.3, undefined, 0.2, true],
    ['between', 0.2, 0.3, undefined, 0.3, true],
    ['between', 0.2, 0.3, undefined, 0.31, false],
    ['between', 0.2, 0.3, undefined, 0.19, false],
    ['between', 0.2, 0.3, 0.01, 0.31, true],
    ['between', 0.2, 0.3, 0.01, 0.1899, false],
  ];
  for (const [comparator, value, valueMax, tolerance, m, expected] of cases) {
    it(`${m} ${comparator} ${value}${valueMax !== undefined ? `…${valueMax}` : ''}${tolerance ? ` ±${tolerance}` : ''} → ${expected}`, () => {
      expect(compare({ comparator, value, valueMax, tolerance }, m)).toBe(expected);
    });
  }
  it('float noise does not decide an edge (0.1 + 0.2 vs 0.3)', () => {
    expect(compare({ comparator: 'lte', value: 0.3 }, 0.1 + 0.2)).toBe(true);
    expect(compare({ comparator: 'eq', value: 0.3 }, 0.1 + 0.2)).toBe(true);
    expect(compare({ comparator: 'lt', value: 0.3 }, 0.1 + 0.2)).toBe(false);
  });
});

describe('RuleSchema', () => {
  it('refuses a non-number value with a clear message', () => {
    const r = RuleSchema.safeParse({ metric: 'walls', comparator: 'eq', value: 'two', severity: 'blocking' });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].path).toEqual(['value']);
    expect(r.error!.issues[0].message).toBe('The rule value must be a number (got "two").');
  });
  it('refuses unknown metrics and comparators, negative tolerance, between without an upper value', () => {
    const bad = [
      { metric: 'speed', comparator: 'eq', value: 1, severity: 'blocking' },
      { metric: 'walls', comparator: 'approx', value: 1, severity: 'blocking' },
      { metric: 'walls', comparator: 'eq', value: 1, tolerance: -1, severity: 'blocking' },
      { metric: 'layer_height_mm', comparator: 'between', value: 0.2, severity: 'blocking' },
      { metric: 'layer_height_mm', comparator: 'between', value: 0.3, valueMax: 0.2, severity: 'blocking' },
      { metric: 'walls', comparator: 'eq', value: Number.NaN, severity: 'blocking' },
      { metric: 'settings_mismatch', comparator: 'eq', value: 2, severity: 'advisory' },
      { metric: 'walls', comparator: 'eq', value: 2, severity: 'fatal' },
    ];
    const messages = bad.map((b) => RuleSchema.safeParse(b).error?.issues[0].message);
    expect(messages[0]).toMatch(/^Unknown metric "speed"; choose one of: infill_percent, walls/);
    expect(messages[1]).toMatch(/^Unknown comparator "approx"/);
    expect(messages[2]).toBe('The tolerance cannot be negative.');
    expect(messages[3]).toBe('A "between" rule needs an upper value (valueMax).');
    expect(messages[4]).toBe('The upper value must not be below the lower value.');
    expect(messages[5]).toMatch(/must be a (finite )?number/);
    expect(messages[6]).toMatch(/yes\/no/);
    expect(messages[7]).toBe('Severity must be "blocking" or "advisory".');
  });
  it('caps a rulebook at 200 rules', () => {
    const one = { metric: 'walls', comparator: 'eq', value: 2, severity: 'blocking' };
    expect(RulebookSchema.safeParse(Array(200).fill(one)).success).toBe(true);
    expect(RulebookSchema.safeParse(Array(201).fill(one)).error?.issues[0].message).toBe('A rulebook holds at most 200 rules.');
  });
});

describe('ruleSentence', () => {
  it('writes plain English with units and tolerance', () => {
    expect(ruleSentence(rule({ metric: 'infill_percent', comparator: 'eq', value: 15, tolerance: 1 }))).toBe('Sparse infill must be 15 % (± 1 %).');
    expect(ruleSentence(rule({ metric: 'layer_height_mm', comparator: 'between', value: 0.2, valueMax: 0.3 }))).toBe('Layer height must be between 0.20 and 0.30 mm.');
    expect(ruleSentence(rule({ metric: 'walls', comparator: 'eq', value: 2 }))).toBe('Walls must be 2.');
    expect(ruleSentence(rule({ metric: 'objects', comparator: 'lte', value: 1 }))).toBe('Objects must be at most 1.');
    expect(ruleSentence(rule({ metric: 'scale_percent', comparator: 'eq', value: 100, tolerance: 1 }))).toBe('Scale must be 100 % (± 1 %).');
    expect(ruleSentence(rule({ metric: 'peak_flow_mm3s', comparator: 'lt', value: 32.5 }))).toBe('Peak flow must be less than 32.5 mm³/s.');
    expect(ruleSentence(rule({ metric: 'feed_override_percent_max', comparator: 'lte', value: 100 }))).toBe('Speed override (max) must be at most 100 %.');
    expect(ruleSentence(rule({ metric: 'settings_mismatch', comparator: 'eq', value: 0 }))).toBe('Settings mismatch must be no.');
    expect(ruleSentence(rule({ metric: 'walls', comparator: 'gte', value: 2, sentence: 'At least two perimeters.' }))).toBe('At least two perimeters.');
  });
});

describe('evaluateRules', () => {
  it('uses the measured value when known and says so', () => {
    const [r] = evaluateRules([rule({ metric: 'infill_percent', comparator: 'eq', value: 15, tolerance: 1 })], report());
    expect(r.status).toBe('pass');
    expect(r.measured).toBe(15.2);
    expect(r.source).toBe('measured');
    expect(r.message).toBe('Sparse infill must be 15 % (± 1 %). Passes: 15.2 %, measured from the toolpaths.');
  });
  it('falls back to the declared value with its source', () => {
    const rep = report({ settings: evidence({ top_layers: [4, null] }) });
    const [r] = evaluateRules([rule({ metric: 'top_layers', comparator: 'eq', value: 5 })], rep);
    expect(r.status).toBe('fail');
    expect(r.measured).toBe(4);
    expect(r.source).toBe('declared');
    expect(r.message).toContain('declared in the comment block');
  });
  it('is unknown, with the reason, when the metric has no value', () => {
    const rep = report({ settings: evidence({ walls: [null, null] }), time: { estimated_s: null } });
    const res = evaluateRules(
      [rule({ metric: 'walls', comparator: 'eq', value: 2 }), rule({ metric: 'estimated_time_s', comparator: 'lt', value: 3600 }), rule({ metric: 'scale_percent', comparator: 'eq', value: 100, tolerance: 1 })],
      rep,
    );
    expect(res.map((r) => r.status)).toEqual(['unknown', 'unknown', 'unknown']);
    expect(res[0].message).toMatch(/Not checked: Neither the toolpaths nor the comment block gave the wall count/);
    expect(res[1].message).toMatch(/Not checked: The report has no time estimate/);
    expect(res[2].message).toMatch(/no test-piece size/);
    expect(res.every((r) => r.measured === null)).toBe(true);
  });
  it('evaluates the demo rulebook on a conforming report', () => {
    const book = RulebookSchema.parse(DEMO_RULEBOOK);
    const res = evaluateRules(book, report(), { testPieceSizeMm: { x: 36, y: 39, z: 40 } });
    expect(res.map((r) => `${r.rule.metric}:${r.status}`)).toEqual(book.map((b) => `${b.metric}:pass`));
    // No M220/M221 in the file: the override metric defaults to 100 %.
    expect(res[7].source).toBe('default');
    // An M220 S150 makes the override rule fail.
    const fast = evaluateRules([book[7]], report({ overrides: { feed_percent_max: 150, flow_percent_max: null } }));
    expect(fast[0].status).toBe('fail');
  });
  it('settings_mismatch ignores the nozzle estimate (a hint from the line width)', () => {
    const rep = report({ settings: evidence({ nozzle_mm: [0.4, 0.5] }) });
    const [r] = evaluateRules([rule({ metric: 'settings_mismatch', comparator: 'eq', value: 0 })], rep);
    expect(r.status).toBe('pass');
    expect(settingsMismatchFlags(rep.settings!).map((f) => [f.code, f.severity])).toEqual([['settings_mismatch_nozzle', 'info']]);
  });
  it('settings_mismatch is true on a lying comment block', () => {
    const rep = report({ settings: evidence({ walls: [2, 3] }) });
    const [r] = evaluateRules([rule({ metric: 'settings_mismatch', comparator: 'eq', value: 0 })], rep);
    expect(r.status).toBe('fail');
    expect(r.measured).toBe(true);
  });
});

describe('settingsMismatchFlags', () => {
  it('counts must match exactly; infill within 3 points; layer height within 0.01 mm', () => {
    expect(settingsMismatchFlags(evidence())).toEqual([]);
    expect(settingsMismatchFlags(evidence({ infill_percent: [15, 18] }))).toEqual([]);
    const infill = settingsMismatchFlags(evidence({ infill_percent: [15, 18.1] }));
    expect(infill.map((f) => f.code)).toEqual(['settings_mismatch_infill']);
    expect(infill[0].message).toContain('declares sparse infill 15 % but the toolpaths show 18 % (allowed difference 3 percentage points)');
    expect(settingsMismatchFlags(evidence({ layer_height_mm: [0.2, 0.21] }))).toEqual([]);
    expect(settingsMismatchFlags(evidence({ layer_height_mm: [0.2, 0.22] })).map((f) => f.code)).toEqual(['settings_mismatch_layer_height']);
    const f = settingsMismatchFlags(evidence({ walls: [2, 3], top_layers: [3, 4] }));
    expect(f.map((x) => x.code)).toEqual(['settings_mismatch_walls', 'settings_mismatch_top_layers']);
    expect(f[0].message).toBe(
      'The comment block declares wall count 2 but the toolpaths show 3 (they must match exactly). The judge should trust the toolpaths; ask the entrant for the unedited G-code.',
    );
    // Nothing declared (comments stripped): nothing to disagree with.
    expect(settingsMismatchFlags(evidence({ walls: [null, 3] }))).toEqual([]);
  });
});

describe('metric list', () => {
  it('is one list with unique ids, each readable from a report', () => {
    expect(new Set(METRIC_IDS).size).toBe(METRIC_IDS.length);
    for (const m of METRICS) {
      expect(metricById(m.id)).toBe(m);
      const v = m.get(report(), { testPieceSizeMm: { x: 36, y: 39, z: 40 } });
      expect(v.value === null || typeof v.value === 'number' || typeof v.value === 'boolean', m.id).toBe(true);
    }
    expect(metricById('scale_percent')!.get(report({ size_mm: { x: 36.36, y: 39.39, z: 40.4 } }), { testPieceSizeMm: { x: 36, y: 39, z: 40 } }).value).toBeCloseTo(101, 6);
  });
  it('every flag code the mismatch check emits is in the one flag list', () => {
    const codes = settingsMismatchFlags(evidence({ infill_percent: [0, 50], walls: [1, 9], top_layers: [1, 9], bottom_layers: [1, 9], layer_height_mm: [0.1, 0.3], nozzle_mm: [0.4, 0.8] })).map((f) => f.code);
    expect(codes).toHaveLength(6);
    for (const c of codes) expect(Object.keys(FLAG_CODES)).toContain(c);
  });
});

describe('rules on real inspections (engine JSON from inspectFile)', () => {
  // The demo season's rulebook against real slicer output (tests/fixtures/manifest.json gives the
  // settings each file was sliced with; the Beacon STL measures 36 × 39 × 40 mm). Same book less
  // the flow-override rule.
  const book = RulebookSchema.parse(DEMO_RULEBOOK.filter((r) => r.metric !== 'flow_override_percent_max'));
  const ctx = { testPieceSizeMm: { x: 36, y: 39, z: 40 } };

  it('a conforming Beacon passes every rule, from measured figures', async () => {
    const { inspectFile } = await import('@/lib/inspection/inspect');
    const r = await inspectFile(path.resolve(__dirname, '../../fixtures/gcode/prusa-beacon-020-nocomments.gcode.gz'), { rules: book, ruleContext: ctx });
    const results = r.rules as RuleResult[];
    expect(results.map((x) => `${x.rule.metric}:${x.status}`)).toEqual(book.map((b) => `${b.metric}:${b.metric === 'settings_mismatch' ? 'unknown' : 'pass'}`));
    // Stripped comments: nothing declared, so the settings come from the toolpaths.
    expect(results.slice(0, 4).every((x) => x.source === 'measured')).toBe(true);
  });

  it('the lying Beacon (28 % layers, 3 walls, 25 % infill claimed as 2 walls, 15 %) fails on measured values', async () => {
    const { inspectFile } = await import('@/lib/inspection/inspect');
    const r = await inspectFile(path.resolve(__dirname, '../../fixtures/gcode/prusa-beacon-028-lying.gcode.gz'), { rules: book, ruleContext: ctx });
    const by = new Map((r.rules as RuleResult[]).map((x) => [x.rule.metric, x]));
    expect(by.get('infill_percent')!.status).toBe('fail');
    expect(by.get('walls')!).toMatchObject({ status: 'fail', measured: 3, source: 'measured' });
    expect(by.get('settings_mismatch')!).toMatchObject({ status: 'fail', measured: true });
    expect(by.get('layer_height_mm')!.status).toBe('pass');
  });
});
