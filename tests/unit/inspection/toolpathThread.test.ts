/**
 * The toolpath-settings analyzer on a second thread (the CLI's way) gives the same report as the
 * analyzer on the parsing thread, on every real slicer fixture; and the CLI bundle uses it.
 * Reference: the same-thread engine (itself checked against slicer settings in fixtures.test.ts).
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { inspectFile } from '@/lib/inspection/inspect';
import { toJsonReport } from '@/lib/inspection/report';
import { createToolpathSettingsThread } from '@/lib/inspection/toolpathThread';

const ROOT = path.resolve(__dirname, '../../..');
const ENGINE = path.join(ROOT, '.hotlap/engine');
const THREAD = path.join(ENGINE, 'toolpath-thread.cjs');
const FIXTURES = path.join(ROOT, 'tests/fixtures/gcode');
const files = fs.readdirSync(FIXTURES).filter((f) => /\.gcode(\.gz)?$/.test(f)).sort();

beforeAll(() => {
  for (const only of ['toolpath-thread', 'inspect-cli']) {
    execFileSync(process.execPath, [path.join(ROOT, 'scripts/build-engine.mjs'), '--quiet', `--only=${only}`], { cwd: ROOT, stdio: 'pipe' });
  }
}, 120_000);

describe('toolpath analysis on a second thread', () => {
  it('has fixtures to compare', () => expect(files.length).toBeGreaterThanOrEqual(10));

  it.each(files)('%s: same report as on the parsing thread', async (name) => {
    const file = path.join(FIXTURES, name);
    let threads = 0;
    const inline = toJsonReport(await inspectFile(file));
    const threaded = toJsonReport(
      await inspectFile(file, {
        toolpathAnalyzer: (o) => {
          threads++;
          return createToolpathSettingsThread(o, THREAD);
        },
      }),
    );
    expect(threads).toBe(1);
    expect(threaded).toEqual(inline);
  });

  it('the CLI bundle runs it and prints the same JSON as the engine on this thread', async () => {
    const file = path.join(FIXTURES, 'prusa-beacon-020.gcode.gz');
    const r = spawnSync(process.execPath, [path.join(ENGINE, 'inspect-cli.cjs'), file, '--json'], { encoding: 'utf8', timeout: 120_000 });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual(JSON.parse(JSON.stringify(toJsonReport(await inspectFile(file)))));
  });

  it('refuses per-layer diagnostics, which need the analyzer on the same thread', () => {
    expect(() => createToolpathSettingsThread({ filamentDiameterMm: 1.75, onLayer: () => undefined }, THREAD)).toThrow(/same thread/);
  });
});
