/**
 * One inspection on a pool thread (lib/jobs/pool.ts runs this file, compiled by
 * `npm run build:engine` to build/engine/inspect-worker.js, in piscina worker threads with a heap
 * cap and a time limit). Runs off the web server's event loop, so a 200 MB G-code never blocks a
 * request; a thread that dies takes only its task with it.
 *
 * A gzip upload is inflated here, counting bytes: a small .gz can inflate to gigabytes (a
 * "zip bomb"), so the inflated size has a cap (`maxInflatedBytes`, a few times the upload limit).
 */
import { open } from 'node:fs/promises';
import { createReadStream } from 'node:fs';
import { Transform, pipeline, type Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { getHeapStatistics } from 'node:v8';
import { isMainThread, resourceLimits } from 'node:worker_threads';
import { inspectFile, inspectStream, toJsonReport, InspectionError, type InspectOptions } from '../inspection';
import { gzipError, isGzipStart } from '../inspection/reader';

export interface InspectTask {
  /** Path of the stored G-code (plain or gzip). */
  file: string;
  options: InspectOptions;
  /** Cap on the bytes a gzip file may inflate to. */
  maxInflatedBytes: number;
}

/** `unreadable`: the file cannot be inspected, `reason` says why in a sentence for the entrant. */
export type InspectTaskResult = { ok: true; report: ReturnType<typeof toJsonReport> } | { ok: false; reason: string };

const MB = 1024 * 1024;

export function inflatedLimitSentence(maxInflatedBytes: number): string {
  return `The compressed G-code inflates to more than ${Math.round(maxInflatedBytes / MB)} MB, the most an inspection reads: upload the plain .gcode, or check that the .gz holds one print's G-code.`;
}

/** A counting gunzip: fails with the sentence once the inflated bytes pass the cap. */
function inflate(file: string, maxInflatedBytes: number): { stream: Readable; exceeded: () => boolean; failure: () => unknown } {
  let bytes = 0;
  let over = false;
  let zlibError: unknown = null;
  const gunzip = createGunzip({ chunkSize: MB });
  gunzip.on('error', (e) => (zlibError ??= e));
  const counter = new Transform({
    transform(chunk: Buffer, _enc, done) {
      bytes += chunk.length;
      if (bytes > maxInflatedBytes) {
        over = true;
        return done(new InspectionError('unreadable', inflatedLimitSentence(maxInflatedBytes)));
      }
      done(null, chunk);
    },
  });
  pipeline(createReadStream(file, { highWaterMark: MB }), gunzip, counter, () => undefined);
  return { stream: counter, exceeded: () => over, failure: () => zlibError };
}

export default async function inspectTask(task: InspectTask): Promise<InspectTaskResult> {
  try {
    const fh = await open(task.file, 'r');
    const head = new Uint8Array(2);
    try {
      await fh.read(head, 0, 2, 0);
    } finally {
      await fh.close();
    }
    if (!isGzipStart(head)) return { ok: true, report: toJsonReport(await inspectFile(task.file, task.options)) };
    const gz = inflate(task.file, task.maxInflatedBytes);
    try {
      return { ok: true, report: toJsonReport(await inspectStream(gz.stream, task.options)) };
    } catch (err) {
      if (gz.exceeded()) return { ok: false, reason: inflatedLimitSentence(task.maxInflatedBytes) };
      if (gz.failure()) throw gzipError(gz.failure());
      throw err;
    }
  } catch (err) {
    // Input the engine cannot use (and values out of range) is the entrant's to fix; the rest is ours.
    if (err instanceof InspectionError || err instanceof RangeError) return { ok: false, reason: err.message.split('\n')[0] };
    const e = err as NodeJS.ErrnoException;
    if (e?.code === 'ENOENT') return { ok: false, reason: 'The stored G-code of this inspection is gone; upload it again.' };
    throw err;
  }
}

/** What this thread runs under, read from the thread itself (tests prove the pool's limits with it). */
export function threadLimits(): { resourceLimits: typeof resourceLimits; heapSizeLimitMb: number; isMainThread: boolean } {
  return { resourceLimits, heapSizeLimitMb: Math.round(getHeapStatistics().heap_size_limit / MB), isMainThread };
}
