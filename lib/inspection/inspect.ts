/**
 * The engine's Node entry points: a file path or a byte stream (plain or gzip, reader.ts) pushed
 * through the environment-neutral inspector (engine.ts). The browser has its own feeder of the
 * same inspector.
 */
import { basename } from 'node:path';
import type { Readable } from 'node:stream';
import { readFileChunks, readStreamChunks } from './reader';
import { createInspector, type InspectOptions } from './engine';
import type { InspectionReport } from './report';

export { createInspector, DEFAULT_FILAMENT_DIAMETER_MM, type InspectOptions, type Inspector, type InspectorSource } from './engine';

/** Inspects a .gcode or .gcode.gz file. Throws InspectionError for input it cannot read. */
export async function inspectFile(path: string, options: InspectOptions = {}): Promise<InspectionReport> {
  const inspector = createInspector({ ...options, name: options.name ?? basename(path) });
  const source = await readFileChunks(path, inspector);
  return inspector.end(source);
}

/** Inspects a byte stream (plain or gzip). Throws InspectionError for input it cannot read. */
export async function inspectStream(input: Readable, options: InspectOptions = {}): Promise<InspectionReport> {
  const inspector = createInspector(options);
  const source = await readStreamChunks(input, inspector);
  return inspector.end(source);
}
