/** runInspectionMain: the exit code and stderr line the CLI and the inspection worker share. */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi, type MockInstance } from 'vitest';
import { InspectionError } from '../../../lib/inspection/reader';
import { parseStoredInspection } from '../../../lib/inspection/contract';
import { firstLine, runInspectionMain } from '../../../lib/inspection/main';
import { tsRunArgs } from '../../../lib/tsRun';

const ROOT = join(__dirname, '../../..');

describe('runInspectionMain', () => {
  let stderr: MockInstance;
  const written = () => stderr.mock.calls.map((c) => String(c[0])).join('');
  beforeEach(() => {
    stderr = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
  });
  afterEach(() => {
    stderr.mockRestore();
    process.exitCode = undefined;
  });

  it('passes on the code main returns', async () => {
    expect(await runInspectionMain(async () => 0)).toBe(0);
    expect(process.exitCode).toBe(0);
    expect(written()).toBe('');
  });

  it('exits 2 with the first line of an InspectionError, prefixed by the subject unless it names it', async () => {
    const fail = (subject: string | undefined, message: string) =>
      runInspectionMain(async (ctx) => {
        ctx.subject = subject;
        throw new InspectionError('empty', message);
      });
    expect(await fail(undefined, 'The file is empty.\nsecond line')).toBe(2);
    expect(await fail('a.gcode', 'The file is empty.')).toBe(2);
    expect(await fail('a.gcode', 'File not found: a.gcode')).toBe(2);
    expect(process.exitCode).toBe(2);
    expect(written()).toBe('The file is empty.\na.gcode: The file is empty.\nFile not found: a.gcode\n');
  });

  it('treats a RangeError as unreadable input too', async () => {
    expect(await runInspectionMain(async () => { throw new RangeError('Value out of range'); })).toBe(2);
    expect(written()).toBe('Value out of range\n');
  });

  it('exits 1 with the stack for anything else', async () => {
    expect(await runInspectionMain(async () => { throw new TypeError('boom'); })).toBe(1);
    expect(written()).toMatch(/^internal error: TypeError: boom\n\s+at /);
  });

  it('firstLine keeps only the first line', () => {
    expect(firstLine('one\ntwo')).toBe('one');
    expect(firstLine('')).toBe('');
  });
});

describe('lib/jobs/inspect-worker.ts', () => {
  const dir = mkdtempSync(join(tmpdir(), 'hotlap-worker-'));
  const run = (stdin: string) => {
    const r = spawnSync(process.execPath, [...tsRunArgs(ROOT), join(ROOT, 'lib/jobs/inspect-worker.ts')], { input: stdin, encoding: 'utf8', timeout: 120_000 });
    return { code: r.status, stdout: r.stdout, stderr: r.stderr };
  };

  it('exits 0 with the report contract and the toolpath preview from the same pass', () => {
    const r = run(JSON.stringify({ file: join(ROOT, 'tests/fixtures/gcode/prusa-beacon-020.gcode.gz'), options: {} }));
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = parseStoredInspection(JSON.parse(r.stdout));
    expect(out.report.layers.count).toBe(200);
    expect(out.preview?.layers.length).toBe(201);
  });

  it('exits 2 with one unprefixed line for a file it cannot read', () => {
    const empty = join(dir, 'empty.gcode');
    writeFileSync(empty, '');
    const r = run(JSON.stringify({ file: empty, options: {} }));
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^The file is empty[^\n]*\n$/);
  });

  it('exits 1 on a job it cannot parse', () => {
    const r = run('not json');
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^internal error: SyntaxError/);
  });
});
