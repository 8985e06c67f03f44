/**
 * The rulebook check in the visitor's browser: a Web Worker that streams the chosen file
 * (File.stream(), never the whole file in memory), inflates a .gz with DecompressionStream, and
 * pushes the bytes through the same engine the server runs (lib/inspection/engine.ts, createInspector),
 * then posts the same report contract (InspectionReport) the server stores. Nothing is uploaded. The server's inspection of an
 * entry's upload stays the one that counts.
 */
import { createInspector } from '@/lib/inspection/engine';
import { InspectionError } from '@/lib/inspection/lines';
import type { CheckMessage, CheckRequest } from './protocol';

// Declared here instead of through the "webworker" lib, which clashes with the project's "dom" lib.
declare const self: { onmessage: ((e: MessageEvent<CheckRequest>) => void) | null; postMessage(m: CheckMessage): void };

/** A progress message every 4 MB read or 100 ms, whichever comes first: enough for a bar, few messages. */
const PROGRESS_BYTES = 4 * 1024 * 1024;
const PROGRESS_MS = 100;

async function isGzip(file: Blob): Promise<boolean> {
  const head = new Uint8Array(await file.slice(0, 2).arrayBuffer());
  return head.length === 2 && head[0] === 0x1f && head[1] === 0x8b;
}

async function check(req: CheckRequest): Promise<CheckMessage> {
  const started = performance.now();
  const inspector = createInspector({ ...req.options, name: req.name });
  const totalBytes = req.file.size;
  let bytesRead = 0;
  let lastBytes = 0;
  let lastAt = started;
  const gzip = await isGzip(req.file);
  // Counts the file's own bytes (compressed for a .gz): what the progress bar shows.
  const counted = req.file.stream().pipeThrough(
    new TransformStream<Uint8Array, Uint8Array>({
      transform(chunk, ctl) {
        bytesRead += chunk.length;
        const now = performance.now();
        if (bytesRead - lastBytes >= PROGRESS_BYTES || now - lastAt >= PROGRESS_MS) {
          lastBytes = bytesRead;
          lastAt = now;
          self.postMessage({ type: 'progress', bytesRead, totalBytes });
        }
        ctl.enqueue(chunk);
      },
    }),
  );
  const stream = gzip ? counted.pipeThrough(new DecompressionStream('gzip') as unknown as TransformStream<Uint8Array, Uint8Array>) : counted;
  const reader = stream.getReader();
  try {
    for (;;) {
      let r: ReadableStreamReadResult<Uint8Array>;
      try {
        r = await reader.read();
      } catch {
        throw new InspectionError('corrupt-gzip', 'The compressed file is damaged or ends early and cannot be decompressed: check that the .gz is complete.');
      }
      if (r.done) break;
      inspector.push(r.value);
    }
  } finally {
    reader.releaseLock();
  }
  self.postMessage({ type: 'progress', bytesRead, totalBytes });
  const report = inspector.end({ bytesIn: totalBytes, gzip });
  return { type: 'done', report, elapsedMs: performance.now() - started, bytesRead };
}

self.onmessage = (e) => {
  check(e.data).then(
    (m) => self.postMessage(m),
    (err: unknown) => {
      const known = err instanceof InspectionError || err instanceof RangeError;
      self.postMessage({ type: 'error', message: known ? (err as Error).message.split('\n')[0] : `The check stopped unexpectedly in this browser (${err instanceof Error ? err.message : String(err)}).` });
    },
  );
};
