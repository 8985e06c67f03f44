/**
 * The toolpath-settings analyzer on a second thread (Node only): the parser, measurements and time
 * planner keep the first core while the raster work of toolpathSettings.ts runs on the second.
 *
 * Why: in the profile of `npm run inspect` on 100 MB of stacked slicer output (node --cpu-prof,
 * 2026-12-03, this 2-core VM), the toolpath analysis was ~0.5–0.75 s of a 1.9 s run — most of it
 * the raster's fixed cell budget, which no per-byte tuning of the parser can win back. The
 * analyzer only reads each move's coordinates, filament, feature and line number, so it can take
 * them from a ring of shared memory instead of the parser's Segment object, and give the same
 * result: every field is copied as the same double, in the same order.
 *
 * Protocol (one SharedArrayBuffer, no allocation per move):
 *   - SLOTS slots of SLOT_MOVES moves × FIELDS doubles; ctrl[WRITTEN] counts slots published by
 *     the parsing thread, ctrl[READ] slots the analyzer finished; counts[slot] is the number of
 *     moves in a slot, END (−1) in the last one. Each side waits on the other's counter with the
 *     value it last saw (Atomics.wait returns at once if it changed: no lost wake-up).
 *   - The parsing thread blocks only when all slots are full (memory stays flat however large the
 *     file); the analyzer answers its result() on a MessagePort and then sets ctrl[DONE].
 * Same-thread use stays the default (createToolpathSettingsAnalyzer): the browser's check and the
 * server's pool run it inline.
 */
import { MessageChannel, Worker, receiveMessageOnPort, workerData, type MessagePort } from 'node:worker_threads';
import { createToolpathSettingsAnalyzer, type MeasuredSettings, type ToolpathSettingsAnalyzer, type ToolpathSettingsOptions } from './toolpathSettings';
import { FEATURE_KINDS, type FeatureKind, type Segment } from './types';

const SLOTS = 8;
const SLOT_MOVES = 8192;
/** x0 y0 z0 x1 y1 z1 eMm meta; meta = lineNo × 32 + feature code × 2 + extruding (exact below 2⁵³). */
const FIELDS = 8;
const WRITTEN = 0;
const READ = 1;
const DONE = 2;
const END = -1;
/** No feature label (FeatureKind null). */
const NO_FEATURE = FEATURE_KINDS.length;
/** Waits are sliced so a thread that died cannot hang the other: no progress for this long is an error. */
const WAIT_SLICE_MS = 250;
const STALL_LIMIT_MS = 120_000;

interface Shared {
  ctrl: Int32Array;
  counts: Int32Array;
  data: Float64Array;
}

function sharedViews(ctrlBuf: SharedArrayBuffer, dataBuf: SharedArrayBuffer): Shared {
  return { ctrl: new Int32Array(ctrlBuf, 0, 4), counts: new Int32Array(ctrlBuf, 16, SLOTS), data: new Float64Array(dataBuf) };
}

/**
 * Waits until ctrl[index] differs from `seen` (or, with stopOnDone, the analyzer has answered);
 * throws after STALL_LIMIT_MS without a change.
 */
function waitChange(ctrl: Int32Array, index: number, seen: number, what: string, stopOnDone = false, limitMs = STALL_LIMIT_MS): number {
  let waited = 0;
  for (;;) {
    const now = Atomics.load(ctrl, index);
    if (now !== seen || (stopOnDone && Atomics.load(ctrl, DONE) !== 0)) return now;
    if (Atomics.wait(ctrl, index, seen, WAIT_SLICE_MS) === 'timed-out') {
      waited += WAIT_SLICE_MS;
      if (waited >= limitMs) throw new Error(`The toolpath analysis thread stopped (${what}).`);
    }
  }
}

interface ThreadData {
  kind: 'hotlap-toolpath-thread';
  ctrl: SharedArrayBuffer;
  data: SharedArrayBuffer;
  port: MessagePort;
  options: ToolpathSettingsOptions;
}

type ThreadAnswer = { ok: true; result: MeasuredSettings } | { ok: false; message: string };

/**
 * The analyzer on a worker thread running `workerFile` (the esbuild bundle of toolpathThreadEntry.ts).
 * Same interface as createToolpathSettingsAnalyzer; result() blocks until the thread has finished.
 */
export function createToolpathSettingsThread(options: ToolpathSettingsOptions, workerFile: string): ToolpathSettingsAnalyzer {
  if (options.onLayer) throw new Error('onLayer diagnostics need the analyzer on the same thread.');
  const ctrlBuf = new SharedArrayBuffer(16 + 4 * SLOTS);
  const dataBuf = new SharedArrayBuffer(SLOTS * SLOT_MOVES * FIELDS * 8);
  const { ctrl, counts, data } = sharedViews(ctrlBuf, dataBuf);
  const { port1, port2 } = new MessageChannel();
  const threadData: ThreadData = { kind: 'hotlap-toolpath-thread', ctrl: ctrlBuf, data: dataBuf, port: port2, options };
  const worker = new Worker(workerFile, { workerData: threadData, transferList: [port2] });
  // The thread must never keep the process alive, and an error surfaces through result().
  worker.unref();
  worker.on('error', () => undefined);

  let written = 0;
  let readSeen = 0;
  let slot = 0;
  let n = 0;
  let base = 0;
  let ended = false;
  let stopped = false;

  function publish(count: number): void {
    counts[slot] = count;
    written++;
    Atomics.store(ctrl, WRITTEN, written);
    Atomics.notify(ctrl, WRITTEN);
    slot = written % SLOTS;
    base = slot * SLOT_MOVES * FIELDS;
    n = 0;
    // Every slot full: wait for the analyzer to free one. An analyzer that failed has answered
    // already: stop feeding it (result() reports its error).
    while (written - readSeen >= SLOTS) {
      if (Atomics.load(ctrl, DONE) !== 0) {
        stopped = true;
        return;
      }
      readSeen = waitChange(ctrl, READ, readSeen, 'the ring stayed full', true);
    }
  }

  return {
    segment(s: Segment): void {
      if (stopped) return;
      const o = base + n * FIELDS;
      data[o] = s.x0;
      data[o + 1] = s.y0;
      data[o + 2] = s.z0;
      data[o + 3] = s.x1;
      data[o + 4] = s.y1;
      data[o + 5] = s.z1;
      data[o + 6] = s.eMm;
      const f = s.feature === null ? NO_FEATURE : FEATURE_KINDS.indexOf(s.feature);
      data[o + 7] = s.lineNo * 32 + f * 2 + (s.extruding ? 1 : 0);
      if (++n === SLOT_MOVES) publish(n);
    },
    end(): void {
      if (ended) return;
      ended = true;
      if (stopped) return;
      if (n > 0) publish(n);
      if (stopped) return;
      counts[slot] = END;
      written++;
      Atomics.store(ctrl, WRITTEN, written);
      Atomics.notify(ctrl, WRITTEN);
    },
    result(): MeasuredSettings {
      if (!ended) this.end!();
      waitChange(ctrl, DONE, 0, 'no result');
      const msg = receiveMessageOnPort(port1)?.message as ThreadAnswer | undefined;
      port1.close();
      void worker.terminate();
      if (!msg) throw new Error('The toolpath analysis thread ended without a result.');
      if (!msg.ok) throw new Error(`The toolpath analysis failed: ${msg.message}`);
      return msg.result;
    },
  };
}

/** The worker thread's side: replays the ring into the analyzer, answers its result, sets DONE. */
export function runToolpathThread(): void {
  const td = workerData as ThreadData | undefined;
  if (!td || td.kind !== 'hotlap-toolpath-thread') throw new Error('toolpath thread started without its shared memory');
  const { ctrl, counts, data } = sharedViews(td.ctrl, td.data);
  let answer: ThreadAnswer;
  try {
    const analyzer = createToolpathSettingsAnalyzer(td.options);
    const s: Segment = { x0: 0, y0: 0, z0: 0, x1: 0, y1: 0, z1: 0, lengthMm: 0, eMm: 0, feedMms: 0, extruding: false, feature: null, tool: 0, lineNo: 0 };
    let read = 0;
    let writtenSeen = 0;
    for (;;) {
      // No stall limit here: the parsing thread may pause (a long stretch without moves); if it dies, so does this thread.
      while (writtenSeen === read) writtenSeen = waitChange(ctrl, WRITTEN, writtenSeen, 'no input', false, Infinity);
      const slot = read % SLOTS;
      const count = counts[slot];
      if (count === END) break;
      const base = slot * SLOT_MOVES * FIELDS;
      for (let i = 0; i < count; i++) {
        const o = base + i * FIELDS;
        s.x0 = data[o];
        s.y0 = data[o + 1];
        s.z0 = data[o + 2];
        s.x1 = data[o + 3];
        s.y1 = data[o + 4];
        s.z1 = data[o + 5];
        s.eMm = data[o + 6];
        const meta = data[o + 7];
        const low = meta % 32;
        s.extruding = (low & 1) === 1;
        const f = low >> 1;
        s.feature = f === NO_FEATURE ? null : (FEATURE_KINDS[f] as FeatureKind);
        s.lineNo = (meta - low) / 32;
        analyzer.segment(s);
      }
      read++;
      Atomics.store(ctrl, READ, read);
      Atomics.notify(ctrl, READ);
    }
    analyzer.end?.();
    answer = { ok: true, result: analyzer.result() };
  } catch (err) {
    answer = { ok: false, message: err instanceof Error ? err.message : String(err) };
  }
  td.port.postMessage(answer);
  Atomics.store(ctrl, DONE, 1);
  Atomics.notify(ctrl, DONE);
  Atomics.notify(ctrl, READ);
}
