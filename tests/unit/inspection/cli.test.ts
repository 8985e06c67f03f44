/** The inspect CLI as a user runs it: exit codes, one-line reasons, the JSON keys the issue lists. */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';

const ROOT = join(__dirname, '../../..');
const FIXTURE = join(ROOT, 'tests/fixtures/gcode/prusa-beacon-020.gcode.gz');
const dir = mkdtempSync(join(tmpdir(), 'hotlap-cli-'));

function run(...args: string[]) {
  const r = spawnSync(process.execPath, ['--require', join(ROOT, 'node_modules/tsx/dist/cjs/index.cjs'), join(ROOT, 'lib/inspection/cli.ts'), ...args], {
    encoding: 'utf8',
    timeout: 120_000,
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const get = (o: unknown, path: string): unknown => path.split('.').reduce<unknown>((v, k) => (v as Record<string, unknown> | undefined)?.[k], o);

describe('npm run inspect', () => {
  it('--json prints one object with every key the issue asks for', () => {
    const rules = join(dir, 'rules.json');
    writeFileSync(
      rules,
      JSON.stringify([
        { metric: 'walls', comparator: 'eq', value: 2, severity: 'blocking' },
        { metric: 'objects', comparator: 'eq', value: 1, severity: 'blocking' },
      ]),
    );
    const r = run(FIXTURE, '--json', '--rules', rules, '--material', 'pla', '--filament-diameter', '1.75');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    const keys = [
      'filament.length_mm', 'filament.volume_mm3', 'filament.mass_g', 'flow.peak_mm3s', 'flow.p95_mm3s', 'flow.mean_mm3s',
      'layers.count', 'layers.height_mm', 'layers.first_height_mm', 'size_mm.x', 'size_mm.y', 'size_mm.z', 'objects',
      'time.estimated_s', 'overrides.feed_percent_max', 'overrides.flow_percent_max',
    ];
    for (const k of keys) expect(get(j, k), k).not.toBeUndefined();
    for (const s of ['infill_percent', 'walls', 'top_layers', 'bottom_layers', 'layer_height_mm', 'nozzle_mm']) {
      expect(get(j, `settings.${s}.declared`), s).not.toBeUndefined();
      expect(get(j, `settings.${s}.measured`), s).not.toBeUndefined();
    }
    expect(j.rules.map((x: { status: string }) => x.status)).toEqual(['pass', 'pass']);
    expect(Array.isArray(j.warnings)).toBe(true);
    expect(j.layers.count).toBe(200);
  });

  it('without --json prints a readable report', () => {
    const r = run(FIXTURE);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Filament[\s\S]*Flow[\s\S]*Layers[\s\S]*Time[\s\S]*Settings\s+declared\s+measured/);
  });

  it.each([
    ['missing', join(dir, 'missing.gcode'), /not found/i],
    ['empty', (() => (writeFileSync(join(dir, 'e.gcode'), ''), join(dir, 'e.gcode')))(), /empty/],
    ['binary G-code', (() => (writeFileSync(join(dir, 'b.bgcode'), 'GCDE\x01\x00\x00\x00'), join(dir, 'b.bgcode')))(), /binary G-code/],
    ['truncated gzip', (() => (writeFileSync(join(dir, 't.gcode.gz'), gzipSync('G1 X1\n'.repeat(20000)).subarray(0, 200)), join(dir, 't.gcode.gz')))(), /ends early/],
  ])('exits 2 with one line for a %s file', (_what, path, reason) => {
    const r = run(path as string);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(reason as RegExp);
  });

  it('exits 2 on a bad option or rulebook', () => {
    expect(run(FIXTURE, '--material', 'unobtainium').code).toBe(2);
    const bad = join(dir, 'bad-rules.json');
    writeFileSync(bad, '[{"metric":"walls","comparator":"about","value":2,"severity":"blocking"}]');
    const r = run(FIXTURE, '--rules', bad);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/comparator/);
  });
});
