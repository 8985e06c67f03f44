/**
 * One inspection on a pool thread (lib/jobs/pool.ts runs this file, compiled by
 * `npm run build:engine` to .hotlap/engine/inspect-worker.cjs, in piscina worker threads with a
 * heap cap and a time limit). Runs off the web server's event loop, so a 200 MB G-code never
 * blocks a request; a thread that dies takes only its task with it.
 *
 * The thread is handed a storage key, never a path: it opens the G-code from storage itself
 * (lib/storage/drivers, the same driver the server uses, set up from the storage variables the pool
 * passes in), so it works the same on local disk and on S3-compatible storage.
 *
 * The engine is fed through a counting sink: a small .gz can inflate to gigabytes (a "zip bomb"),
 * so the bytes it inflates to have a cap (`maxInflatedBytes`, a few times the upload limit).
 */
import { getHeapStatistics } from 'node:v8';
import { isMainThread, resourceLimits } from 'node:worker_threads';
import { createInspector, InspectionError, type InspectOptions, type StoredInspectionJson } from '../inspection';
import { toStoredInspection } from '../inspection/engine';
import { readStreamChunks } from '../inspection/reader';
import { createDriver, storageConfig, StorageNotFoundError, type StorageDriver } from '../storage/drivers';

export interface InspectTask {
  /** Storage key of the stored G-code (plain or gzip). */
  key: string;
  options: InspectOptions;
  /** Cap on the bytes the file may inflate to. */
  maxInflatedBytes: number;
  /** Cap on the points of the judges' preview built in the same pass. */
  previewMaxPoints: number;
}

/** `ok: true`: the report contract and, from the same pass, the judges' toolpath preview. `ok: false`: the file cannot be inspected; `reason` says why in a sentence for the entrant. */
export type InspectTaskResult = { ok: true; stored: StoredInspectionJson } | { ok: false; reason: string };

const MB = 1024 * 1024;

export function inflatedLimitSentence(maxInflatedBytes: number): string {
  return `The compressed G-code inflates to more than ${Math.round(maxInflatedBytes / MB)} MB, the most an inspection reads: upload the plain .gcode, or check that the .gz holds one print's G-code.`;
}

const GONE = 'The stored G-code of this inspection is gone; upload it again.';

let driver: { sig: string; driver: StorageDriver } | undefined;

/** The storage this thread reads from: the settings the pool passed in its environment (STORAGE_URL always set). */
function threadStorage(): StorageDriver {
  if (!process.env.STORAGE_URL) throw new Error('The inspection worker was started without storage settings (STORAGE_URL).');
  const config = storageConfig(process.env, '');
  const sig = JSON.stringify(config);
  if (driver?.sig !== sig) driver = { sig, driver: createDriver(config) };
  return driver.driver;
}

export default async function inspectTask(task: InspectTask): Promise<InspectTaskResult> {
  try {
    const inspector = createInspector({ ...task.options, name: task.options.name ?? task.key.split('/').pop(), preview: { maxPoints: task.previewMaxPoints } });
    let inflated = 0;
    const input = await threadStorage().get(task.key);
    const source = await readStreamChunks(input, {
      push(chunk: Uint8Array) {
        inflated += chunk.length;
        // Thrown inside the reader's loop: it stops inflating and passes an InspectionError on as it is.
        if (inflated > task.maxInflatedBytes) throw new InspectionError('unreadable', inflatedLimitSentence(task.maxInflatedBytes));
        inspector.push(chunk);
      },
    });
    return { ok: true, stored: toStoredInspection(inspector.finish(source)) };
  } catch (err) {
    if (err instanceof StorageNotFoundError) return { ok: false, reason: GONE };
    // Input the engine cannot use (and values out of range) is the entrant's to fix; the rest is ours.
    if (err instanceof InspectionError || err instanceof RangeError) {
      const reason = err.message.split('\n')[0];
      return { ok: false, reason: err instanceof InspectionError && err.code === 'not-found' ? GONE : reason };
    }
    throw err;
  }
}

/** What this thread runs under, read from the thread itself (tests prove the pool's limits with it). */
export function threadLimits(): { resourceLimits: typeof resourceLimits; heapSizeLimitMb: number; isMainThread: boolean } {
  return { resourceLimits, heapSizeLimitMb: Math.round(getHeapStatistics().heap_size_limit / MB), isMainThread };
}
