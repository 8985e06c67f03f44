/**
 * Messages between the rulebook check's Web Worker (checkWorker.ts, bundled to
 * /engine/gcode-check.js) and the page (components/GcodeCheck.tsx). Types only: both sides import it.
 */
import type { InspectOptions } from '@/lib/inspection/engine';
import type { InspectionReport } from '@/lib/inspection/contract';

/** Page → worker: the visitor's file (a File is cloned by reference; its bytes stay on disk) and the options. */
export interface CheckRequest {
  file: Blob;
  name: string;
  /** Options the engine takes that can cross to a worker (rules, rule context, claims, diameter, material). */
  options: Omit<InspectOptions, 'sinks' | 'name' | 'preview'>;
}

export type CheckMessage =
  | { type: 'progress'; bytesRead: number; totalBytes: number }
  | { type: 'done'; report: InspectionReport; elapsedMs: number; bytesRead: number }
  | { type: 'error'; message: string };

/** Where the bundle is served from (scripts/build-engine.mjs writes public/engine/gcode-check.js). */
export const CHECK_WORKER_URL = '/engine/gcode-check.js';
