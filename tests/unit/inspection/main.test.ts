/** runInspectionMain: the exit code and stderr line of the inspect CLI. */
import { afterEach, beforeEach, describe, expect, it, vi, type MockInstance } from 'vitest';
import { InspectionError } from '../../../lib/inspection/reader';
import { firstLine, runInspectionMain } from '../../../lib/inspection/main';

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
