/**
 * The engine's Node entry points: a file path or a byte stream (plain or gzip, reader.ts) pushed
 * through the environment-neutral inspector (engine.ts). The browser has its own feeder of the
 * same inspector.
 */
import { basename } from 'node:path';
import type { Readable } from 'node:stream';
import { readFileChunks, readStreamChunks } from './reader';
import { createInspector, toStoredInspection, type InspectOptions, type StoredInspection } from './engine';
import type { EngineReport } from './report';
import type { PreviewOptions, ToolpathPreview } from './preview';

export {
  createInspector,
  toStoredInspection,
  DEFAULT_FILAMENT_DIAMETER_MM,
  type InspectOptions,
  type Inspector,
  type InspectorSource,
  type StoredInspection,
} from './engine';

/** Inspects a .gcode or .gcode.gz file. Throws InspectionError for input it cannot read. */
export async function inspectFile(path: string, options: InspectOptions = {}): Promise<EngineReport> {
  const inspector = createInspector({ ...options, name: options.name ?? basename(path) });
  const source = await readFileChunks(path, inspector);
  return inspector.finish(source);
}

/** What an inspection job stores for a file: the report contract and (with options.preview) the toolpath preview. */
export async function inspectFileToStore(path: string, options: InspectOptions = {}): Promise<StoredInspection> {
  return toStoredInspection(await inspectFile(path, options));
}

/** The toolpath preview alone (the same pass, measurements skipped where they can be): for tests and scripts. */
export async function buildPreviewFromFile(path: string, options: PreviewOptions = {}): Promise<ToolpathPreview> {
  const { filamentDiameterMm, parser, ...rest } = options;
  const r = await inspectFile(path, { filamentDiameterMm, parser, preview: rest, skipToolpathSettings: true });
  return r.preview!;
}

/** The toolpath preview of a byte stream (plain or gzip). */
export async function buildPreviewFromStream(input: Readable, options: PreviewOptions = {}): Promise<ToolpathPreview> {
  const { filamentDiameterMm, parser, ...rest } = options;
  const r = await inspectStream(input, { filamentDiameterMm, parser, preview: rest, skipToolpathSettings: true });
  return r.preview!;
}

/** Inspects a byte stream (plain or gzip). Throws InspectionError for input it cannot read. */
export async function inspectStream(input: Readable, options: InspectOptions = {}): Promise<EngineReport> {
  const inspector = createInspector(options);
  const source = await readStreamChunks(input, inspector);
  return inspector.finish(source);
}
