/**
 * The native engine: the parser, measurements, time planner and toolpath settings analysis of this
 * folder ported operation for operation to C++ (lib/inspection/native/), built at install time by
 * scripts/build-native.mjs. The reader (files, gzip, the text checks) and the declared-settings
 * reader stay in TypeScript; the native object is the LineSink the reader feeds.
 *
 * Why native code rather than the TypeScript engine alone: the benchmark target is the full
 * inspection at ≥ 10× the throughput of the most-used npm G-code parser (gcode-parser). Tuned as
 * far as measurements allowed, the TypeScript engine reached 4.3–5.2× (67–80 MB/s on the 100 MB
 * bench stack, the peer 14–17 MB/s in the same runs); this engine does 10.9–12.4× (210–248 MB/s,
 * 0.40–0.48 s per 100 MB with the analyzers on a second thread; npm run bench:inspect, 2026-12-02).
 *
 * The TypeScript engine stays the reference and the fallback (no compiler at install, or
 * HOTLAP_ENGINE=ts): tests/unit/inspection/native.test.ts checks both give the same report.
 */
import { createRequire } from 'node:module';
import { join } from 'node:path';
import type { LineSink } from './reader';
import { commentMayMatter, type DeclaredSettingsReader } from './declared';
import type { MachineLimits } from './planner';
import type { MachineState, ParserOptions, ParserStats, ParserWarning } from './parser';
import type { MeasureResult } from './measure';
import type { MeasuredSettings } from './toolpathSettings';

interface NativeComments {
  bytes: Buffer;
  ends: Uint32Array;
  lineNos: Float64Array;
}

interface NativeEngineHandle {
  lines(buf: Buffer, start: number, end: number): number;
  line(buf: Buffer, start: number, end: number): void;
  longLine(bytes: number): void;
  takeComments(): NativeComments | null;
  end(): void;
  /** Frees the engine (stops its worker thread); after result(), or to abandon the stream. */
  close(): void;
  result(): string;
}

interface NativeModule {
  Engine: new (options: object) => NativeEngineHandle;
  version: number;
}

/** Where node-gyp puts the addon (binding.gyp target hotlap_inspection); HOTLAP_NATIVE_ADDON overrides (sanitizer builds). */
export const NATIVE_ADDON_PATH = process.env.HOTLAP_NATIVE_ADDON || join(__dirname, '..', '..', 'build', 'Release', 'hotlap_inspection.node');

let loaded: NativeModule | null | undefined;
let loadError: string | null = null;

/** The addon, or null when it was not built (the reason is in nativeEngineLoadError()). */
export function loadNativeEngine(): NativeModule | null {
  if (loaded === undefined) {
    try {
      loaded = createRequire(__filename)(NATIVE_ADDON_PATH) as NativeModule;
    } catch (e) {
      loaded = null;
      loadError = (e as Error).message.split('\n')[0];
    }
  }
  return loaded;
}

export function nativeEngineLoadError(): string | null {
  loadNativeEngine();
  return loadError;
}

/** Machine limits as the report lists them: parser.ts MachineState's fields and setBy. */
export type MachineSnapshot = Omit<MachineState, 'mark'>;

/** What the per-move stages hand to the report, from either engine. */
export interface EngineOutput {
  stats: ParserStats;
  warnings: ParserWarning[];
  machine: MachineSnapshot;
  measure: MeasureResult;
  toolpath: MeasuredSettings | null;
}

export interface NativeRunOptions {
  filamentDiameterMm: number;
  limits: MachineLimits;
  parser: ParserOptions;
  toolpath: boolean;
}

/** JSON from C++ writes non-finite numbers as these strings. */
function revive(_key: string, v: unknown): unknown {
  if (v === 'NaN') return NaN;
  if (v === 'Infinity') return Infinity;
  if (v === '-Infinity') return -Infinity;
  return v;
}

/**
 * By first byte, the comments the declared-settings reader can use; the engine keeps only those.
 * A first byte ≥ 0x80 decodes to a non-ASCII first character, which never matters either.
 */
const COMMENT_FIRST_BYTES = Uint8Array.from({ length: 256 }, (_, b) => (commentMayMatter(b) ? 1 : 0));

/**
 * The native engine as the reader's LineSink. Comments come back in batches after each call and go
 * to the declared-settings reader, in file order.
 */
export class NativeLineSink implements LineSink {
  private readonly engine: NativeEngineHandle;
  private readonly declared: DeclaredSettingsReader;

  constructor(mod: NativeModule, options: NativeRunOptions, declared: DeclaredSettingsReader) {
    this.engine = new mod.Engine({ ...options, commentFirstBytes: COMMENT_FIRST_BYTES });
    this.declared = declared;
  }

  lines(buf: Buffer, start: number, end: number): number {
    const n = this.engine.lines(buf, start, end);
    this.drain();
    return n;
  }

  line(buf: Buffer, start: number, end: number): void {
    this.engine.line(buf, start, end);
    this.drain();
  }

  longLine(bytes: number): void {
    this.engine.longLine(bytes);
  }

  private drain(): void {
    const c = this.engine.takeComments();
    if (c === null) return;
    let from = 0;
    for (let i = 0; i < c.ends.length; i++) {
      const to = c.ends[i];
      this.declared.comment(c.bytes.toString('utf8', from, to), c.lineNos[i]);
      from = to;
    }
  }

  /** Abandons the stream when the reader failed: the engine's worker thread stops now, not at GC. */
  close(): void {
    this.engine.close();
  }

  /** Ends the stream and returns what the stages measured. */
  finish(): EngineOutput {
    this.engine.end();
    const json = this.engine.result();
    this.engine.close();
    const r = JSON.parse(json, revive) as {
      parser: {
        stats: Omit<ParserStats, 'unknownCommands' | 'toolsUsed'> & { unknownCommands: [string, number][]; toolsUsed: number[] };
        warnings: ParserWarning[];
        machine: Record<string, number | null> & { setBy: string[] };
      };
      measure: MeasureResult;
      toolpath: MeasuredSettings | null;
    };
    const { stats, warnings, machine } = r.parser;
    return {
      stats: { ...stats, unknownCommands: new Map(stats.unknownCommands), toolsUsed: new Set(stats.toolsUsed) },
      warnings,
      machine: { ...machine, setBy: new Set(machine.setBy) } as unknown as MachineSnapshot,
      measure: r.measure,
      toolpath: r.toolpath,
    };
  }
}
