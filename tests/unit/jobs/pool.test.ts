/**
 * The inspection pool with the compiled worker (built here by npm run build:engine's script):
 * reports, settings that reach the worker, limits read back from a pool thread, the inflated-size
 * cap on gzip, a truncated gzip and the time limit, each with its sentence. The worker is given
 * storage keys and reads the G-code from storage itself (here local disk in a temporary folder).
 */
import { describe, it, expect, beforeAll, afterAll, vi } from 'vitest';
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { inspectInPool, InspectionRunError, jobSettings, type JobSettings } from '@/lib/jobs';
import { closePool, poolThreadLimits } from '@/lib/jobs/pool';
import { putBuffer } from '@/lib/storage';
import { startFakeS3 } from '../../support/s3';

const ROOT = path.resolve(__dirname, '../../..');
const FIXTURE_FILE = path.join(ROOT, 'tests/fixtures/gcode/prusa-beacon-020.gcode.gz');
const FIXTURE = 'fixtures/beacon-020.gcode.gz';
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-pool-'));
const MB = 1024 * 1024;
let base: JobSettings;

beforeAll(async () => {
  execFileSync(process.execPath, [path.join(ROOT, 'scripts/build-engine.mjs'), '--quiet', '--only=inspect-worker'], { cwd: ROOT, stdio: 'pipe' });
  base = { ...jobSettings(), heapMb: 256 };
  process.env.STORAGE_URL = path.join(dir, 'uploads');
  await putBuffer(FIXTURE, fs.readFileSync(FIXTURE_FILE));
}, 120_000);

afterAll(async () => {
  await closePool();
  delete process.env.STORAGE_URL;
  fs.rmSync(dir, { recursive: true, force: true });
});

const failure = (p: Promise<unknown>) => p.then(() => null, (e: unknown) => e as InspectionRunError);

describe('inspection pool', () => {
  it('runs in a worker thread under the heap cap it was given (read back from the thread)', async () => {
    const t = await poolThreadLimits(base);
    expect(t.isMainThread).toBe(false);
    expect(t.resourceLimits.maxOldGenerationSizeMb).toBe(256);
    // V8's heap limit is old + young generation (+ a little): well under the server's own.
    expect(t.heapSizeLimitMb).toBeGreaterThanOrEqual(256);
    expect(t.heapSizeLimitMb).toBeLessThan(400);
  });

  it('returns the report, and the settings reach the worker (filament diameter)', async () => {
    const stored = await inspectInPool(FIXTURE, { name: 'beacon.gcode.gz' }, base);
    const r175 = stored.report;
    // The judges' preview comes from the same pass, checked against its format by the pool.
    expect(stored.preview).not.toBeNull();
    // 200 layers: the fixture is the Beacon sliced at 0.2 mm (tests/fixtures/README.md, PrusaSlicer's own settings).
    expect(r175.layers.count).toBe(200);
    expect(r175.file.name).toBe('beacon.gcode.gz');
    const r285 = (await inspectInPool(FIXTURE, { filamentDiameterMm: 2.85 }, base)).report;
    // Volume scales with the filament's cross-section: (2.85 / 1.75)² (geometry, no source needed beyond πd²/4).
    expect(r285.filament.volume_mm3! / r175.filament.volume_mm3!).toBeCloseTo((2.85 / 1.75) ** 2, 4);
  });

  it("the job's preview cap reaches the worker", async () => {
    const { preview } = await inspectInPool(FIXTURE, {}, { ...base, previewMaxPoints: 1000 });
    expect(preview!.stats.pointsIn).toBe(1000);
    expect(preview!.warnings).toContain('The file has more than 1000 path points; the preview shows the first ones only.');
  });

  it('a gzip that inflates past the cap fails with a sentence, not a full disk or heap', async () => {
    const bomb = 'fixtures/bomb.gcode.gz';
    const bytes = gzipSync(Buffer.from('G1 X10 Y10 E0.1 F3000\n'.repeat(Math.ceil((3 * MB) / 22))));
    await putBuffer(bomb, bytes);
    expect(bytes.length).toBeLessThan(64 * 1024);
    const err = await failure(inspectInPool(bomb, {}, { ...base, maxInflatedBytes: MB }));
    expect(err).toBeInstanceOf(InspectionRunError);
    expect(err!.kind).toBe('unreadable');
    expect(err!.message).toBe('The compressed G-code inflates to more than 1 MB, the most an inspection reads: upload the plain .gcode, or check that the .gz holds one print\'s G-code.');
    // Under the cap the same file inspects.
    await expect(inspectInPool(bomb, {}, { ...base, maxInflatedBytes: 4 * MB })).resolves.toBeTruthy();
  });

  it('a truncated gzip fails with the engine\'s sentence', async () => {
    const cut = 'fixtures/cut.gcode.gz';
    const whole = fs.readFileSync(FIXTURE_FILE);
    await putBuffer(cut, whole.subarray(0, Math.floor(whole.length / 2)));
    const err = await failure(inspectInPool(cut, {}, base));
    expect(err!.kind).toBe('unreadable');
    expect(err!.message).toMatch(/^The compressed file ends early \(truncated gzip\)/);
  });

  it('a stored file that is gone fails with a sentence for the entrant (no storage path in it)', async () => {
    const err = await failure(inspectInPool('fixtures/never-stored.gcode', {}, base));
    expect(err!.kind).toBe('unreadable');
    expect(err!.message).toBe('The stored G-code of this inspection is gone; upload it again.');
  });

  it('a job past its time limit is stopped with a sentence, and the pool goes on', async () => {
    const err = await failure(inspectInPool(FIXTURE, {}, { ...base, timeLimitMs: 5 }));
    expect(err!.kind).toBe('timeout');
    expect(err!.message).toMatch(/^The inspection took longer than 5 ms and was stopped: check that the file is one print's G-code/);
    await expect(inspectInPool(FIXTURE, {}, base)).resolves.toBeTruthy();
  });

  it('on S3 storage the thread reads the G-code from the bucket itself (settings passed to the thread)', async () => {
    const s3 = await startFakeS3(Number(process.env.HOTLAP_TEST_S3_PORT || 4570) + 3);
    const saved = process.env.STORAGE_URL;
    const env = s3.env('pool');
    Object.assign(process.env, env);
    try {
      await putBuffer('entries/9/gcode-s3.gcode.gz', fs.readFileSync(FIXTURE_FILE));
      await vi.waitFor(() => expect(s3.events).toContain('ObjectCreated:Put pool/entries/9/gcode-s3.gcode.gz'));
      const { report } = await inspectInPool('entries/9/gcode-s3.gcode.gz', { name: 'beacon.gcode.gz' }, base);
      expect(report.layers.count).toBe(200);
      const err = await failure(inspectInPool('entries/9/none.gcode', {}, base));
      expect(err!.message).toBe('The stored G-code of this inspection is gone; upload it again.');
    } finally {
      for (const k of Object.keys(env)) delete process.env[k];
      process.env.STORAGE_URL = saved;
      await closePool();
      await s3.stop();
    }
  });
});
