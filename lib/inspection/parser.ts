/**
 * G-code parser: a small state machine over the bytes of one line at a time. It resolves all modal
 * state (units, distance modes, offsets, arcs, firmware retraction, speed and flow factors) and hands
 * one reused Segment per straight move to a SegmentSink, so analyzers see absolute millimetres and
 * net filament only.
 *
 * Semantics follow the NIST RS274NGC interpreter report (NISTIR 6556) for arcs, units, distance
 * modes and modal motion, and the RepRap / Marlin G-code references for the printer dialect
 * (G92, M82/M83, G10/G11, M204/M205, M220/M221…). Section names are given beside each rule.
 *
 * Our own parser rather than a package, for speed and for the modal state: the most-used general
 * G-code parser on npm (gcode-parser 2.2, GCodeLineStream) builds an object per line and a string
 * per word and resolves no units, modes, offsets or arcs; on the 100 MB bench stack it measured
 * 9.7–11.8 MB per CPU-second against 125–134 for this reader + parser (npm run bench:inspect).
 */
import type { FeatureKind, Segment, SegmentSink } from './types';
import type { LineSink } from './lines';
import * as C from './engineConstants';

/** Extra callbacks the time planner uses; optional on any sink. */
export interface MotionSink extends SegmentSink {
  /** G4 dwell of timeS seconds. */
  dwell?(timeS: number, lineNo: number): void;
}

export interface ParserOptions {
  /** Verify `*nn` checksums (RepRap wiki "Checking"); a mismatch is a warning. Default true. */
  verifyChecksums?: boolean;
  /** Firmware retraction length for G10 when the file sets none with M207 (mm). */
  firmwareRetractMm?: number;
  /** Firmware retraction feed (mm/s). */
  firmwareRetractFeedMms?: number;
  /** Longest chord error allowed when splitting arcs into lines, mm. */
  arcToleranceMm?: number;
  /** Cap on stored warnings (the rest are only counted). */
  maxWarnings?: number;
}

export interface ParserWarning {
  code: string;
  lineNo: number;
  message: string;
}

/** Motion limits as set in the file (M201/M203/M204/M205, Klipper SET_VELOCITY_LIMIT). null = not set. */
export class MachineState {
  accelPrintMms2: number | null = null;
  accelTravelMms2: number | null = null;
  accelRetractMms2: number | null = null;
  /** Klipper ACCEL_TO_DECEL (older Klipper); null when not set. */
  accelToDecelMms2: number | null = null;
  minimumCruiseRatio: number | null = null;
  jerkXMms: number | null = null;
  jerkYMms: number | null = null;
  jerkZMms: number | null = null;
  jerkEMms: number | null = null;
  junctionDeviationMm: number | null = null;
  squareCornerVelocityMms: number | null = null;
  maxFeedXMms: number | null = null;
  maxFeedYMms: number | null = null;
  maxFeedZMms: number | null = null;
  maxFeedEMms: number | null = null;
  /** Klipper VELOCITY: limit on the toolhead speed. */
  maxVelocityMms: number | null = null;
  maxAccelXMms2: number | null = null;
  maxAccelYMms2: number | null = null;
  maxAccelZMms2: number | null = null;
  maxAccelEMms2: number | null = null;
  /** Bumped on every change except accelerations (read per move) so the planner can cache derived limits. */
  version = 0;
  /** Which command families set limits (for the report). */
  readonly setBy = new Set<string>();
  private lastMark = '';
  mark(command: string): void {
    if (command === this.lastMark) return;
    this.lastMark = command;
    this.setBy.add(command);
  }
}

/** Where an override was seen. */
export interface OverrideEvent {
  percent: number;
  lineNo: number;
}

export interface ParserStats {
  lines: number;
  commands: number;
  moves: number;
  arcs: number;
  unknownCommands: Map<string, number>;
  unknownCommandCount: number;
  checksumErrors: number;
  longLines: number;
  warningsTotal: number;
  speedFactor: { max: OverrideEvent | null; min: OverrideEvent | null; count: number };
  flowFactor: { max: OverrideEvent | null; min: OverrideEvent | null; count: number };
  nozzleTempMaxC: number | null;
  bedTempMaxC: number | null;
  fanMaxPercent: number | null;
  toolsUsed: Set<number>;
  firmwareRetractions: number;
  featureLabels: number;
  /** Dialect hints seen: a text command form (Klipper) or M-code limits. */
  textCommands: number;
}

// Byte constants.
const SPACE = 32;
const TAB = 9;
const CR = 13;
const LF = 10;
/** Local copy: an imported binding costs a getter call per access under CommonJS interop. */
const MAX_LINE = C.MAX_LINE_BYTES;
const SEMI = 59;
const LPAREN = 40;
const RPAREN = 41;
const STAR = 42;
const PLUS = 43;
const MINUS = 45;
const DOT = 46;
const D0 = 48;
const D9 = 57;
const UNDERSCORE = 95;

const L_E = 4;
const L_F = 5;
const L_G = 6;
const L_I = 8;
const L_J = 9;
const L_L = 11;
const L_M = 12;
const L_N = 13;
const L_P = 15;
const L_R = 17;
const L_S = 18;
const L_T = 19;
const L_X = 23;
const L_Y = 24;
const L_Z = 25;
const BIT = (l: number): number => 1 << l;
const AXES_MASK = BIT(L_X) | BIT(L_Y) | BIT(L_Z) | BIT(L_E);

const POW10 = new Float64Array(23);
for (let i = 0; i < POW10.length; i++) POW10[i] = Math.pow(10, i);

// Sanity caps (engineConstants.ts), as module constants: an imported binding costs a getter call
// per access under CommonJS interop.
const MAX_COORD_MM = C.PARSER_MAX_COORD_MM;
const MAX_E_MM = C.MAX_E_MM;
const MAX_FEED_MM_MIN = C.MAX_FEED_MM_MIN;
const MIN_FEED_MM_MIN = C.MIN_FEED_MM_MIN;
const MAX_LIMIT = C.MAX_LIMIT;
const MIN_ACCEL = C.MIN_ACCEL;
const MIN_FEED_LIMIT_MMS = C.MIN_FEED_LIMIT_MMS;
const MAX_ARC_CHORDS = C.MAX_ARC_CHORDS;
const MAX_TOOLS = C.MAX_TOOLS;

/**
 * Maps a slicer ";TYPE:" label (PrusaSlicer, Slic3r, CuraEngine dialects) to a FeatureKind; null for
 * PrusaSlicer's "Custom" (the user's start/end code, e.g. a prime line), which is not part of the print.
 */
export function featureFromLabel(label: string): FeatureKind | null {
  const l = label.trim().toLowerCase();
  switch (l) {
    case 'custom':
      return null;
    // PrusaSlicer / Slic3r PE labels
    case 'external perimeter':
      return 'outer-wall';
    case 'perimeter':
      return 'inner-wall';
    case 'overhang perimeter':
      return 'overhang-wall';
    case 'internal infill':
      return 'sparse-infill';
    case 'solid infill':
      return 'solid-infill';
    case 'top solid infill':
      return 'top-solid';
    case 'bottom solid infill':
      return 'bottom-solid';
    case 'bridge infill':
    case 'internal bridge infill':
      return 'bridge';
    case 'skirt':
    case 'skirt/brim':
    case 'brim':
      return 'skirt';
    case 'support material':
    case 'support material interface':
      return 'support';
    case 'gap fill':
      return 'gap-fill';
    // CuraEngine labels
    case 'wall-outer':
      return 'outer-wall';
    case 'wall-inner':
      return 'inner-wall';
    case 'fill':
      return 'sparse-infill';
    case 'skin':
      return 'solid-infill';
    case 'support':
    case 'support-interface':
    case 'support-infill':
      return 'support';
    default:
      // Orca-style ";FEATURE:" spellings and anything else
      if (l === 'outer wall') return 'outer-wall';
      if (l === 'inner wall') return 'inner-wall';
      if (l === 'sparse infill') return 'sparse-infill';
      if (l === 'internal solid infill') return 'solid-infill';
      if (l === 'top surface') return 'top-solid';
      if (l === 'bottom surface') return 'bottom-solid';
      if (l.startsWith('bridge')) return 'bridge';
      if (l.includes('skirt') || l.includes('brim')) return 'skirt';
      if (l.startsWith('support')) return 'support';
      return 'other';
  }
}

/** Slic3r's verbose per-move comments (gcode_comments = 1) → feature, or null. */
function featureFromVerboseComment(text: string): FeatureKind | null {
  const l = text.toLowerCase();
  if (l === 'perimeter') return 'inner-wall';
  if (l === 'external perimeter') return 'outer-wall';
  if (l === 'infill' || l === 'fill') return 'sparse-infill';
  if (l === 'solid infill') return 'solid-infill';
  if (l === 'top solid infill') return 'top-solid';
  if (l === 'bridge infill' || l === 'bridge' || l === 'infill (bridge)') return 'bridge';
  if (l === 'skirt' || l === 'brim') return 'skirt';
  if (l.startsWith('support material')) return 'support';
  if (l === 'gap fill') return 'gap-fill';
  return null;
}

/** M-codes whose argument is free text; the rest of the line is not parsed as words. */
function isTextArgMcode(m: number): boolean {
  return m === 117 || m === 118 || m === 23 || m === 28 || m === 29 || m === 30 || m === 32 || m === 928 || m === 33;
}

/** G/M codes understood as having no effect on measurements or time. */
const KNOWN_NO_EFFECT_G = new Set([17, 29, 30, 31, 32, 34, 53, 54, 55, 56, 57, 58, 59, 60, 61, 64, 80, 94]);
const KNOWN_NO_EFFECT_M = new Set([
  0, 1, 17, 18, 23, 24, 25, 26, 27, 28, 29, 30, 31, 32, 33, 42, 48, 49, 73, 74, 75, 76, 77, 78, 80, 81, 84, 105, 107, 108,
  110, 111, 112, 113, 114, 115, 117, 118, 119, 120, 121, 122, 141, 149, 150, 155, 163, 164, 191, 200, 206, 209, 210, 211,
  217, 218, 232, 280, 290, 300, 400, 401, 402, 412, 413, 420, 486, 500, 501, 502, 503, 555, 566, 568, 572, 593, 600, 601,
  701, 702, 851, 862, 900, 907, 928, 1001, 1002,
]);

/**
 * Klipper extended commands that change neither geometry, filament nor the motion limits we model
 * (Klipper G-code reference). User macros such as PRINT_START stay "unknown": they can do anything.
 */
const KNOWN_NO_EFFECT_TEXT = new Set([
  'EXCLUDE_OBJECT_DEFINE',
  'EXCLUDE_OBJECT_START',
  'EXCLUDE_OBJECT_END',
  'SET_PRESSURE_ADVANCE',
  'SET_FAN_SPEED',
  'SET_HEATER_TEMPERATURE',
  'TEMPERATURE_WAIT',
  'TURN_OFF_HEATERS',
  'SET_PRINT_STATS_INFO',
  'SET_IDLE_TIMEOUT',
  'BED_MESH_PROFILE',
  'BED_MESH_CALIBRATE',
]);

export class GcodeParser implements LineSink {
  readonly stats: ParserStats = {
    lines: 0,
    commands: 0,
    moves: 0,
    arcs: 0,
    unknownCommands: new Map(),
    unknownCommandCount: 0,
    checksumErrors: 0,
    longLines: 0,
    warningsTotal: 0,
    speedFactor: { max: null, min: null, count: 0 },
    flowFactor: { max: null, min: null, count: 0 },
    nozzleTempMaxC: null,
    bedTempMaxC: null,
    fanMaxPercent: null,
    toolsUsed: new Set([0]),
    firmwareRetractions: 0,
    featureLabels: 0,
    textCommands: 0,
  };
  readonly warnings: ParserWarning[] = [];
  readonly machine: MachineState;

  private readonly sink: MotionSink;
  private readonly wantsComments: boolean;
  private readonly verifyChecksums: boolean;
  private readonly arcTolMm: number;
  private readonly maxWarnings: number;

  // Reused output object (see Segment docs: consumers copy what they keep).
  private readonly seg: Segment = {
    x0: 0,
    y0: 0,
    z0: 0,
    x1: 0,
    y1: 0,
    z1: 0,
    lengthMm: 0,
    eMm: 0,
    feedMms: 0,
    extruding: false,
    feature: null,
    tool: 0,
    lineNo: 0,
  };

  // Physical position (what the machine moves to), and G92 offsets: logical = physical − offset.
  private px = 0;
  private py = 0;
  private pz = 0;
  private ox = 0;
  private oy = 0;
  private oz = 0;
  /** Logical E position (mm of filament). */
  private eLogical = 0;
  private unitMm = 1;
  private axisRelative = false;
  private eModeRelative = false;
  private plane = 17;
  /** Modal motion code (0..3) per RS274NGC; −1 before the first motion. */
  private motionMode = -1;
  private feedMmMin = 1800;
  private speedFactor = 1;
  private savedSpeedFactor = 1;
  private readonly flowFactor = new Float64Array(MAX_TOOLS).fill(1);
  private tool = 0;
  private feature: FeatureKind | null = null;
  private labelsSeen = false;
  private readonly featureCache = new Map<string, FeatureKind | null>();

  // Firmware retraction (Marlin FWRETRACT: M207/M208/G10/G11).
  private fwRetractMm: number;
  private fwRetractFeedMms: number;
  private fwRecoverExtraMm = 0;
  private fwRecoverFeedMms: number;
  private fwRetracted = false;

  // Per-line word state.
  private lineNo = 0;
  private mask = 0;
  private readonly vals = new Float64Array(26);
  private readonly gCodes = new Float64Array(8);
  private nG = 0;
  private readonly mCodes = new Float64Array(8);
  private nM = 0;
  private toolWordFirst = false;
  private firstWord = true;
  private trailingComment: string | null = null;

  // Number scanner output.
  /** Value of the number readNumber() just scanned (a field, so no boxed double is returned). */
  private numVal = 0;

  constructor(sink: MotionSink, options: ParserOptions = {}, machine: MachineState = new MachineState()) {
    this.sink = sink;
    this.machine = machine;
    this.wantsComments = typeof sink.comment === 'function';
    this.verifyChecksums = options.verifyChecksums ?? true;
    this.arcTolMm = options.arcToleranceMm ?? 0.01;
    this.maxWarnings = options.maxWarnings ?? 50;
    // Default length for G10 when no M207 is present: Marlin's FWRETRACT RETRACT_LENGTH (from memory: 3 mm, 45 mm/s).
    this.fwRetractMm = options.firmwareRetractMm ?? 3;
    this.fwRetractFeedMms = options.firmwareRetractFeedMms ?? 45;
    this.fwRecoverFeedMms = this.fwRetractFeedMms;
  }

  /** Current active tool and feature, for analyzers that want them outside segments. */
  get currentFeature(): FeatureKind | null {
    return this.feature;
  }

  get featureLabelsSeen(): boolean {
    return this.labelsSeen;
  }

  warn(code: string, message: string, lineNo = this.lineNo): void {
    this.stats.warningsTotal++;
    if (this.warnings.length < this.maxWarnings) this.warnings.push({ code, lineNo, message });
  }

  longLine(bytes: number): void {
    this.noteLongLine(bytes, this.lineNo + 1, this.warnings.length);
  }

  /** Ends the stream: flushes the sink. */
  end(): void {
    this.sink.end?.();
  }

  /**
   * Parses one line, [start, end) without its line break. Also the worker of lines(): the scan
   * stops at an LF, whose index it returns (else end).
   */
  line(buf: Uint8Array, start: number, end: number): number {
    this.lineNo++;
    this.stats.lines++;
    this.beginStatement();
    let i = start;
    let stmtStart = start;
    while (i < end) {
      const c = buf[i];
      // Letters first: they start most words, so the common case takes one test.
      const letter = (c | 0x20) - 97; // lower-case, 0..25 for a letter
      if (letter >= 0 && letter <= 25) {
        // A first word that is a name, not a letter + number, is a text command (Klipper style).
        if (this.firstWord && i + 1 < end) {
          const n1 = buf[i + 1];
          const n1l = n1 | 0x20;
          if (n1 === UNDERSCORE || (n1l >= 97 && n1l <= 122)) {
            i = this.textCommand(buf, i, end);
            continue;
          }
        }
        const wordAt = i;
        i++;
        const j = this.readNumber(buf, i, end, wordAt === start || buf[wordAt - 1] === SPACE || buf[wordAt - 1] === TAB);
        const v = this.numVal;
        if (j < 0) {
          // Letter without a number, e.g. "G28 X Y": present, no value. Bad text right after it is malformed.
          const nc = i < end ? buf[i] : SPACE;
          if (!isTerminator(nc) && !isLetter(nc)) {
            this.warn('malformed-number', `Line ${this.lineNo}: '${String.fromCharCode(letter + 65)}' is not followed by a valid number; word ignored.`);
            i = skipWord(buf, i, end);
            continue;
          }
          this.storeWord(letter, NaN);
          continue;
        }
        const nc = j < end ? buf[j] : SPACE;
        if (!isTerminator(nc) && !isLetter(nc)) {
          this.warn(
            'malformed-number',
            `Line ${this.lineNo}: malformed number '${latin1(buf, i, Math.min(skipWord(buf, j, end), i + 32))}' for ${String.fromCharCode(letter + 65)}; word ignored.`,
          );
          i = skipWord(buf, j, end);
          continue;
        }
        i = j;
        if (letter === L_M && this.firstWord && isTextArgMcode(v)) {
          // M117 and friends carry free text: stop parsing words.
          this.storeWord(letter, v);
          while (i < end && buf[i] !== LF) i++;
          continue;
        }
        this.storeWord(letter, v);
        continue;
      }
      if (c === SPACE || c === TAB) {
        i++;
        continue;
      }
      if (c === LF) break;
      if (c === CR) {
        // A CR inside a line is a line break (lone-CR files); a trailing CR of CRLF ends nothing new.
        this.execute();
        this.beginStatement();
        i++;
        if (i < end && buf[i] !== LF) {
          this.lineNo++;
          this.stats.lines++;
          stmtStart = i;
        }
        continue;
      }
      if (c === SEMI) {
        // Comment to the end of the line (or to a lone CR).
        let j = i + 1;
        while (j < end && buf[j] !== CR && buf[j] !== LF) j++;
        this.handleComment(buf, i + 1, j);
        i = j;
        continue;
      }
      if (c === LPAREN) {
        let j = i + 1;
        while (j < end && buf[j] !== RPAREN && buf[j] !== CR && buf[j] !== LF) j++;
        this.handleComment(buf, i + 1, j);
        i = j < end && buf[j] === RPAREN ? j + 1 : j;
        continue;
      }
      if (c === STAR) {
        i = this.checksum(buf, stmtStart, i, end);
        continue;
      }
      this.warn('bad-character', `Line ${this.lineNo}: unexpected character '${String.fromCharCode(c)}' ignored.`);
      i = skipWord(buf, i, end);
    }
    this.execute();
    return i;
  }

  /**
   * Parses the complete lines of [start, end), where end − 1 is an LF, and returns how many there
   * were. Line breaks are found by the parse itself rather than by the reader searching for each
   * LF first (Buffer.indexOf cost ~0.1 s per 100 MB in per-line calls). A line longer than
   * MAX_LINE_BYTES is read to that length and reported as LineSplitter would report it.
   */
  lines(buf: Uint8Array, start: number, end: number): number {
    let s = start;
    let n = 0;
    while (s < end) {
      const limit = end - s > MAX_LINE ? s + MAX_LINE : end;
      const lineNo = this.lineNo + 1;
      const warningsBefore = this.warnings.length;
      const stop = this.line(buf, s, limit);
      n++;
      if (stop < limit || buf[stop] === LF) {
        s = stop + 1;
        continue;
      }
      // Longer than the limit: the rest up to the LF is dropped, as LineSplitter does.
      const lf = buf.indexOf(LF, stop);
      this.noteLongLine(lf - s, lineNo, warningsBefore);
      s = lf + 1;
    }
    return n;
  }

  /**
   * Counts a cut line and files its warning at index `at` of the list (where it belongs in line
   * order), within the list's cap: at the end for longLine(), before the line's own warnings when
   * lines() finds the cut after parsing.
   */
  private noteLongLine(bytes: number, lineNo: number, at: number): void {
    this.stats.longLines++;
    this.stats.warningsTotal++;
    if (at >= this.maxWarnings) return;
    this.warnings.splice(at, 0, { code: 'long-line', lineNo, message: `Line ${lineNo} is ${bytes} bytes long; only its first 64 KB were read.` });
    if (this.warnings.length > this.maxWarnings) this.warnings.pop();
  }

  private beginStatement(): void {
    this.mask = 0;
    this.nG = 0;
    this.nM = 0;
    this.toolWordFirst = false;
    this.firstWord = true;
    this.trailingComment = null;
  }

  private storeWord(letter: number, v: number): void {
    if (letter === L_N && this.firstWord) return; // line number: strip (RepRap wiki "N: Line number")
    if (letter === L_G) {
      if (this.nG < 8) this.gCodes[this.nG++] = v;
    } else if (letter === L_M) {
      if (this.nM < 8) this.mCodes[this.nM++] = v;
    } else {
      if (letter === L_T && this.firstWord) this.toolWordFirst = true;
      this.vals[letter] = v;
      this.mask |= 1 << letter;
    }
    this.firstWord = false;
  }

  /**
   * Parses [+-]digits[.digits][e±dd] by hand from char codes into numVal; returns the index after
   * it, or −1 when no digits (see readExponent for when an 'e' belongs to the number).
   */
  private readNumber(buf: Uint8Array, i: number, end: number, spaced: boolean): number {
    // The common number (sign, up to nine digits, a dot, no exponent) is scanned here; this body
    // is kept small so V8 inlines it into line(). Longer numbers and exponents continue in
    // readLongNumber() and readExponent(), which are called rarely.
    let neg = false;
    if (i < end && (buf[i] === MINUS || buf[i] === PLUS)) {
      neg = buf[i] === MINUS;
      i++;
    }
    // One pass: digits into an integer mantissa; the dot's position gives the fraction digit count
    // afterwards, so each digit costs one range test and a multiply-add. The first nine digits are
    // summed in int32 arithmetic (exact below 10⁹, and cheaper than a double multiply-add).
    let mant = 0;
    let nd = 0;
    let dotAt = -1;
    while (i < end) {
      const d = buf[i] - D0;
      if (d >= 0 && d <= 9) {
        if (nd === 9) return this.readLongNumber(buf, i, end, spaced, neg, dotAt, mant);
        mant = (mant * 10 + d) | 0;
        nd++;
      } else if (d === DOT - D0 && dotAt < 0) dotAt = i;
      else break;
      i++;
    }
    if (nd === 0) {
      this.numVal = NaN;
      return -1;
    }
    // One division of exact integers is correctly rounded (fd ≤ 9 here: fraction digits are digits).
    const fd = dotAt >= 0 ? i - dotAt - 1 : 0;
    const v = fd > 0 ? mant / POW10[fd] : mant;
    this.numVal = neg ? -v : v;
    if (spaced && i + 1 < end && (buf[i] | 0x20) === 101) return this.readExponent(buf, i, end);
    return i;
  }

  /** readNumber() past nine digits: goes on in doubles from the same exact value (exact below 2^53, ≈ 15 digits). */
  private readLongNumber(buf: Uint8Array, i: number, end: number, spaced: boolean, neg: boolean, dotAt: number, mantInt: number): number {
    let mant = mantInt;
    while (i < end) {
      const d = buf[i] - D0;
      if (d >= 0 && d <= 9) mant = mant * 10 + d;
      else if (d === DOT - D0 && dotAt < 0) dotAt = i;
      else break;
      i++;
    }
    const fd = dotAt >= 0 ? i - dotAt - 1 : -1;
    const v = fd > 0 ? (fd < POW10.length ? mant / POW10[fd] : mant / Math.pow(10, fd)) : mant;
    this.numVal = neg ? -v : v;
    if (spaced && i + 1 < end && (buf[i] | 0x20) === 101) return this.readExponent(buf, i, end);
    return i;
  }

  /**
   * An exponent after the number in numVal ("1e308"): read only for a space-separated word whose
   * exponent is followed by a separator; otherwise 'E' starts the next word, as in Marlin's
   * parser, which strips 'E' so "X10E5" is X10 E5 (Marlin GCodeParser::value_float).
   */
  private readExponent(buf: Uint8Array, i: number, end: number): number {
    let k = i + 1;
    let eneg = false;
    if (buf[k] === MINUS || buf[k] === PLUS) {
      eneg = buf[k] === MINUS;
      k++;
    }
    let ex = 0;
    let ed = 0;
    while (k < end && buf[k] >= D0 && buf[k] <= D9) {
      if (ex < 10000) ex = ex * 10 + (buf[k] - D0);
      ed++;
      k++;
    }
    if (ed > 0 && (k >= end || isTerminator(buf[k]))) {
      this.numVal = this.numVal * Math.pow(10, eneg ? -ex : ex);
      return k;
    }
    return i;
  }

  private checksum(buf: Uint8Array, stmtStart: number, star: number, end: number): number {
    let j = star + 1;
    let want = 0;
    let nd = 0;
    while (j < end && buf[j] >= D0 && buf[j] <= D9) {
      want = want * 10 + (buf[j] - D0);
      nd++;
      j++;
    }
    if (this.verifyChecksums) {
      // RepRap wiki "Checking": XOR of every byte before '*', including the N word.
      let cs = 0;
      for (let k = stmtStart; k < star; k++) cs ^= buf[k];
      if (nd === 0 || (cs & 0xff) !== want) {
        this.stats.checksumErrors++;
        this.warn('checksum', `Line ${this.lineNo}: checksum ${nd ? want : '(missing)'} does not match the line (expected ${cs & 0xff}).`);
      }
    }
    // Anything after the checksum up to a comment is ignored.
    while (j < end && buf[j] !== SEMI && buf[j] !== CR && buf[j] !== LF) j++;
    return j;
  }

  private handleComment(buf: Uint8Array, s: number, e: number): void {
    // Trim.
    while (s < e && (buf[s] === SPACE || buf[s] === TAB)) s++;
    while (e > s && (buf[e - 1] === SPACE || buf[e - 1] === TAB || buf[e - 1] === CR)) e--;
    if (e <= s) return;
    // ";TYPE:" (PrusaSlicer, Slic3r PE, CuraEngine) or ";FEATURE:" sets the feature of following moves.
    const isType =
      e - s > 5 &&
      (buf[s] === 84 && buf[s + 1] === 89 && buf[s + 2] === 80 && buf[s + 3] === 69 && buf[s + 4] === 58);
    const isFeature =
      !isType &&
      e - s > 8 &&
      buf[s] === 70 &&
      buf[s + 1] === 69 &&
      buf[s + 2] === 65 &&
      buf[s + 3] === 84 &&
      buf[s + 4] === 85 &&
      buf[s + 5] === 82 &&
      buf[s + 6] === 69 &&
      buf[s + 7] === 58;
    if (!this.wantsComments && !isType && !isFeature && (this.firstWord || this.labelsSeen)) return;
    const text = utf8(buf, s, e);
    if (isType || isFeature) {
      const label = text.slice(isType ? 5 : 8);
      let f = this.featureCache.get(label);
      if (f === undefined) {
        f = featureFromLabel(label);
        if (this.featureCache.size < 256) this.featureCache.set(label, f);
      }
      this.feature = f;
      this.labelsSeen = true;
      this.stats.featureLabels++;
    } else if (!this.firstWord && !this.labelsSeen) {
      this.trailingComment = text;
    }
    if (this.wantsComments) this.sink.comment!(text, this.lineNo);
  }

  /** Klipper-style extended command: NAME KEY=VALUE … */
  private textCommand(buf: Uint8Array, i: number, end: number): number {
    let j = i;
    while (j < end && buf[j] !== SPACE && buf[j] !== TAB && buf[j] !== SEMI && buf[j] !== CR && buf[j] !== LF) j++;
    const name = latin1(buf, i, j).toUpperCase();
    this.firstWord = false;
    this.stats.commands++;
    this.stats.textCommands++;
    // Find end of statement (before a comment).
    let k = j;
    while (k < end && buf[k] !== SEMI && buf[k] !== CR && buf[k] !== LF) k++;
    if (name === 'SET_VELOCITY_LIMIT') {
      const args = latin1(buf, j, k);
      this.setVelocityLimit(args);
    } else if (name === 'SET_RETRACTION') {
      const args = parseKeyValues(latin1(buf, j, k));
      const len = args.get('RETRACT_LENGTH');
      const spd = args.get('RETRACT_SPEED');
      if (len !== undefined && len >= 0 && len < 100) this.fwRetractMm = len;
      if (spd !== undefined && spd >= MIN_FEED_LIMIT_MMS && spd < 1000) this.fwRetractFeedMms = spd;
    } else if (!KNOWN_NO_EFFECT_TEXT.has(name)) {
      this.countUnknown(name);
    }
    return k;
  }

  private setVelocityLimit(argText: string): void {
    const m = this.machine;
    const args = parseKeyValues(argText);
    const accel = args.get('ACCEL');
    const scv = args.get('SQUARE_CORNER_VELOCITY');
    const vel = args.get('VELOCITY');
    const a2d = args.get('ACCEL_TO_DECEL');
    const mcr = args.get('MINIMUM_CRUISE_RATIO');
    if (accel !== undefined && this.sane('ACCEL', accel, MIN_ACCEL, MAX_LIMIT)) {
      m.accelPrintMms2 = accel;
      m.accelTravelMms2 = accel;
    }
    if (scv !== undefined && this.sane('SQUARE_CORNER_VELOCITY', scv, -1, 1e4)) m.squareCornerVelocityMms = scv;
    if (vel !== undefined && this.sane('VELOCITY', vel, MIN_FEED_LIMIT_MMS, 1e5)) m.maxVelocityMms = vel;
    if (a2d !== undefined && this.sane('ACCEL_TO_DECEL', a2d, MIN_ACCEL, MAX_LIMIT)) m.accelToDecelMms2 = a2d;
    if (mcr !== undefined && this.sane('MINIMUM_CRUISE_RATIO', mcr, -1, 1)) m.minimumCruiseRatio = mcr;
    m.mark('SET_VELOCITY_LIMIT');
    m.version++;
  }

  /** True when min < v ≤ max and finite; otherwise a warning. */
  private sane(what: string, v: number, min: number, max: number): boolean {
    if (Number.isFinite(v) && v > min && v <= max) return true;
    this.warn('absurd-value', `Line ${this.lineNo}: ${what} ${v} is out of range; ignored.`);
    return false;
  }

  private countUnknown(name: string): void {
    this.stats.unknownCommandCount++;
    const u = this.stats.unknownCommands;
    const n = u.get(name);
    if (n !== undefined) u.set(name, n + 1);
    else if (u.size < 64) u.set(name, 1);
  }

  private has(letter: number): boolean {
    return (this.mask & (1 << letter)) !== 0;
  }

  /** Value of a present word with a finite number, else NaN (with a warning if it was present but bad). */
  private num(letter: number): number {
    if ((this.mask & (1 << letter)) === 0) return NaN;
    const v = this.vals[letter];
    if (v !== v) {
      this.warn('malformed-number', `Line ${this.lineNo}: ${String.fromCharCode(letter + 65)} has no valid number; ignored.`);
    }
    return v;
  }

  private execute(): void {
    const nG = this.nG;
    const nM = this.nM;
    if (nG === 0 && nM === 0) {
      if (this.toolWordFirst) {
        this.stats.commands++;
        this.toolChange(this.vals[L_T]);
        return;
      }
      if ((this.mask & (AXES_MASK | BIT(L_F))) !== 0 && this.motionMode >= 0) {
        // Modal motion: axis words alone repeat the current motion mode (NISTIR 6556 §3.5.1 "motion mode").
        this.stats.commands++;
        this.motion(this.motionMode);
      } else if (this.mask !== 0) {
        this.noCommand();
      }
      return;
    }
    this.stats.commands++;
    // Non-motion G codes first (units, distance mode), motion last (NISTIR 6556 §3.8 "order of execution").
    let motion = -1;
    for (let k = 0; k < nG; k++) {
      const g = this.gCodes[k];
      if (g === 0 || g === 1 || g === 2 || g === 3) motion = g;
      else this.gCode(g);
    }
    if (motion >= 0) {
      this.motionMode = motion;
      this.motion(motion);
    }
    for (let k = 0; k < nM; k++) this.mCode(this.mCodes[k]);
  }

  /** Words with no G, M or T command and no motion mode to repeat (e.g. "Q77"): they do nothing. */
  private noCommand(): void {
    let letters = '';
    for (let l = 0; l < 26; l++) if (this.mask & (1 << l)) letters += String.fromCharCode(65 + l);
    this.warn('no-command', `Line ${this.lineNo}: ${letters.length > 1 ? 'words' : 'word'} ${letters} without a G, M or T command (or a motion mode to repeat); ignored.`);
  }

  private gCode(g: number): void {
    switch (g) {
      case 20:
        this.unitMm = 25.4; // NISTIR 6556 §3.5.11: G20 inch units
        return;
      case 21:
        this.unitMm = 1;
        return;
      case 90:
        // NISTIR 6556 §3.5.16 absolute distance mode. E follows M82/M83 again (Klipper gcode_move; RepRap wiki G90).
        this.axisRelative = false;
        return;
      case 91:
        // Relative mode; in Marlin and Klipper G91 makes E relative too (Marlin G91 reference).
        this.axisRelative = true;
        return;
      case 92:
        this.setPosition();
        return;
      case 28:
        this.home();
        return;
      case 4:
        this.dwell();
        return;
      case 10:
        if (this.has(L_L) || this.has(L_P)) return; // RS274 G10 L2/L20: coordinate system data, no motion
        this.firmwareRetract();
        return;
      case 11:
        this.firmwareRecover();
        return;
      case 17:
      case 18:
      case 19:
        this.plane = g;
        return;
      default:
        if (!KNOWN_NO_EFFECT_G.has(g)) this.countUnknown(`G${g}`);
    }
  }

  private mCode(m: number): void {
    switch (m) {
      case 82:
        this.eModeRelative = false; // RepRap wiki M82: absolute extrusion
        return;
      case 83:
        this.eModeRelative = true; // RepRap wiki M83: relative extrusion
        return;
      case 220:
        this.setSpeedFactor();
        return;
      case 221:
        this.setFlowFactor();
        return;
      case 204:
        this.m204();
        return;
      case 205:
        this.m205();
        return;
      case 201:
        this.m201();
        return;
      case 203:
        this.m203();
        return;
      case 207: {
        // Marlin M207: S length (mm), F feed (mm/min), Z lift.
        this.fwRetractMm = this.limit('M207', L_S, -1e-9, 100) ?? this.fwRetractMm;
        const f = this.limit('M207', L_F, MIN_FEED_MM_MIN, MAX_FEED_MM_MIN);
        if (f !== null) this.fwRetractFeedMms = f / 60;
        return;
      }
      case 208: {
        // Marlin M208: S extra recover length (mm), F recover feed (mm/min).
        this.fwRecoverExtraMm = this.limit('M208', L_S, -100, 100) ?? this.fwRecoverExtraMm;
        const f = this.limit('M208', L_F, MIN_FEED_MM_MIN, MAX_FEED_MM_MIN);
        if (f !== null) this.fwRecoverFeedMms = f / 60;
        return;
      }
      case 104:
      case 109: {
        const s = this.has(L_S) ? this.vals[L_S] : this.has(L_R) ? this.vals[L_R] : NaN;
        if (s === s && s >= 0 && s < 1000) {
          if (this.stats.nozzleTempMaxC === null || s > this.stats.nozzleTempMaxC) this.stats.nozzleTempMaxC = s;
        }
        return;
      }
      case 140:
      case 190: {
        const s = this.has(L_S) ? this.vals[L_S] : this.has(L_R) ? this.vals[L_R] : NaN;
        if (s === s && s >= 0 && s < 1000) {
          if (this.stats.bedTempMaxC === null || s > this.stats.bedTempMaxC) this.stats.bedTempMaxC = s;
        }
        return;
      }
      case 106: {
        const s = this.has(L_S) ? this.vals[L_S] : 255;
        if (s === s && s >= 0) {
          const pct = Math.min(100, (s <= 1 && s > 0 && !Number.isInteger(s) ? s * 255 : s) / 2.55);
          if (this.stats.fanMaxPercent === null || pct > this.stats.fanMaxPercent) this.stats.fanMaxPercent = pct;
        }
        return;
      }
      default:
        if (!KNOWN_NO_EFFECT_M.has(m)) this.countUnknown(`M${m}`);
    }
  }

  private toolChange(t: number): void {
    if (!(t === t) || t < 0 || t >= MAX_TOOLS || !Number.isInteger(t)) {
      this.warn('bad-tool', `Line ${this.lineNo}: tool number ${t} is not supported (T0–T${MAX_TOOLS - 1}); ignored.`);
      return;
    }
    this.tool = t;
    this.stats.toolsUsed.add(t);
  }

  /** Marlin M220 S<percent>; B/R back up and restore the factor. */
  private setSpeedFactor(): void {
    if (this.has(L_S)) {
      const s = this.num(L_S);
      if (s === s && this.sane('M220 S', s, 0.999, 10000)) {
        this.speedFactor = s / 100;
        recordOverride(this.stats.speedFactor, s, this.lineNo);
      }
    } else if (this.has(L_R)) {
      this.speedFactor = this.savedSpeedFactor;
      recordOverride(this.stats.speedFactor, this.speedFactor * 100, this.lineNo);
    } else if (this.has(1 /* B */)) {
      this.savedSpeedFactor = this.speedFactor;
    }
  }

  /** Marlin M221 S<percent> [T<tool>]: flow factor of a tool's extruder. */
  private setFlowFactor(): void {
    if (!this.has(L_S)) return;
    const s = this.num(L_S);
    if (!(s === s) || !this.sane('M221 S', s, 0, 10000)) return;
    let t = this.tool;
    if (this.has(L_T)) {
      const tv = this.vals[L_T];
      if (tv === tv && tv >= 0 && tv < MAX_TOOLS && Number.isInteger(tv)) t = tv;
    }
    this.flowFactor[t] = s / 100;
    recordOverride(this.stats.flowFactor, s, this.lineNo);
  }

  /** A limit word's value if present and within (min, max]; null (with a warning if bad) otherwise. */
  private limit(cmd: string, letter: number, min: number, max: number): number | null {
    const v = this.num(letter);
    if (v !== v) return null;
    if (v > min && v <= max) return v;
    this.sane(`${cmd} ${String.fromCharCode(letter + 65)}`, v, min, max); // warns
    return null;
  }

  private m204(): void {
    const m = this.machine;
    // Marlin M204: P printing, R retract, T travel; S sets printing and travel (legacy). Klipper: S, or min(P,T).
    const s = this.limit('M204', L_S, MIN_ACCEL, MAX_LIMIT);
    if (s !== null) {
      m.accelPrintMms2 = s;
      m.accelTravelMms2 = s;
    }
    m.accelPrintMms2 = this.limit('M204', L_P, MIN_ACCEL, MAX_LIMIT) ?? m.accelPrintMms2;
    m.accelRetractMms2 = this.limit('M204', L_R, MIN_ACCEL, MAX_LIMIT) ?? m.accelRetractMms2;
    m.accelTravelMms2 = this.limit('M204', L_T, MIN_ACCEL, MAX_LIMIT) ?? m.accelTravelMms2;
    // Accelerations are read by the planner on every move, so no version bump (slicers send M204 per feature).
    m.mark('M204');
  }

  private m205(): void {
    const m = this.machine;
    // Marlin M205: X/Y/Z/E jerk in mm/s, J junction deviation in mm.
    m.jerkXMms = this.limit('M205', L_X, -1e-9, 1e4) ?? m.jerkXMms;
    m.jerkYMms = this.limit('M205', L_Y, -1e-9, 1e4) ?? m.jerkYMms;
    m.jerkZMms = this.limit('M205', L_Z, -1e-9, 1e4) ?? m.jerkZMms;
    m.jerkEMms = this.limit('M205', L_E, -1e-9, 1e4) ?? m.jerkEMms;
    m.junctionDeviationMm = this.limit('M205', L_J, -1e-9, 10) ?? m.junctionDeviationMm;
    m.mark('M205');
    m.version++;
  }

  private m201(): void {
    const m = this.machine;
    // Marlin M201: per-axis max acceleration, mm/s².
    m.maxAccelXMms2 = this.limit('M201', L_X, MIN_ACCEL, MAX_LIMIT) ?? m.maxAccelXMms2;
    m.maxAccelYMms2 = this.limit('M201', L_Y, MIN_ACCEL, MAX_LIMIT) ?? m.maxAccelYMms2;
    m.maxAccelZMms2 = this.limit('M201', L_Z, MIN_ACCEL, MAX_LIMIT) ?? m.maxAccelZMms2;
    m.maxAccelEMms2 = this.limit('M201', L_E, MIN_ACCEL, MAX_LIMIT) ?? m.maxAccelEMms2;
    m.mark('M201');
    m.version++;
  }

  private m203(): void {
    const m = this.machine;
    // Marlin M203: per-axis max feed, mm/s.
    m.maxFeedXMms = this.limit('M203', L_X, MIN_FEED_LIMIT_MMS, 1e5) ?? m.maxFeedXMms;
    m.maxFeedYMms = this.limit('M203', L_Y, MIN_FEED_LIMIT_MMS, 1e5) ?? m.maxFeedYMms;
    m.maxFeedZMms = this.limit('M203', L_Z, MIN_FEED_LIMIT_MMS, 1e5) ?? m.maxFeedZMms;
    m.maxFeedEMms = this.limit('M203', L_E, MIN_FEED_LIMIT_MMS, 1e5) ?? m.maxFeedEMms;
    m.mark('M203');
    m.version++;
  }

  /** G92: set the logical position without moving (RepRap wiki G92); no axis words = all axes to 0. */
  private setPosition(): void {
    const any = (this.mask & AXES_MASK) !== 0;
    const u = this.unitMm;
    if (!any) {
      this.ox = this.px;
      this.oy = this.py;
      this.oz = this.pz;
      this.eLogical = 0;
      return;
    }
    const vals = this.vals;
    if (this.coordOk(L_X)) this.ox = this.px - vals[L_X] * u;
    if (this.coordOk(L_Y)) this.oy = this.py - vals[L_Y] * u;
    if (this.coordOk(L_Z)) this.oz = this.pz - vals[L_Z] * u;
    if (this.coordOk(L_E, MAX_E_MM)) this.eLogical = vals[L_E] * u;
  }

  /** G28: homed axes go to 0 and lose their G92 offset (Marlin G28). No axis words = all. */
  private home(): void {
    const any = (this.mask & (BIT(L_X) | BIT(L_Y) | BIT(L_Z))) !== 0;
    if (!any || this.has(L_X)) {
      this.px = 0;
      this.ox = 0;
    }
    if (!any || this.has(L_Y)) {
      this.py = 0;
      this.oy = 0;
    }
    if (!any || this.has(L_Z)) {
      this.pz = 0;
      this.oz = 0;
    }
  }

  private dwell(): void {
    // G4 P<ms> or S<s> (RepRap wiki G4; Marlin P is milliseconds).
    let t = 0;
    const p = this.num(L_P);
    const s = this.num(L_S);
    if (s === s) t = s;
    else if (p === p) t = p / 1000;
    if (t > 0 && t < 1e6) this.sink.dwell?.(t, this.lineNo);
    else if (t !== 0) this.warn('absurd-value', `Line ${this.lineNo}: dwell of ${t} s ignored.`);
  }

  private firmwareRetract(): void {
    if (this.fwRetracted) return; // Marlin ignores a repeated G10
    this.fwRetracted = true;
    this.stats.firmwareRetractions++;
    this.emitStationaryE(-this.fwRetractMm, this.fwRetractFeedMms);
  }

  private firmwareRecover(): void {
    if (!this.fwRetracted) return;
    this.fwRetracted = false;
    this.emitStationaryE(this.fwRetractMm + this.fwRecoverExtraMm, this.fwRecoverFeedMms);
  }

  private emitStationaryE(eMm: number, feedMms: number): void {
    if (eMm === 0) return;
    const s = this.seg;
    s.x0 = s.x1 = this.px;
    s.y0 = s.y1 = this.py;
    s.z0 = s.z1 = this.pz;
    s.lengthMm = 0;
    s.eMm = eMm * this.flowFactor[this.tool];
    s.feedMms = feedMms;
    s.extruding = false;
    s.feature = this.feature;
    s.tool = this.tool;
    s.lineNo = this.lineNo;
    this.stats.moves++;
    this.sink.segment(s);
  }

  /**
   * True when the axis word is present with a finite value within ±maxAbs (read it from vals);
   * a present but bad word gives a warning. Returns a boolean, not the double, to avoid boxing.
   */
  private coordOk(letter: number, maxAbs = MAX_COORD_MM): boolean {
    if ((this.mask & (1 << letter)) === 0) return false;
    const v = this.vals[letter];
    if (v >= -maxAbs && v <= maxAbs) return true; // the common case: one range test (false for NaN)
    this.badCoord(letter, maxAbs); // kept out of line so this method stays small enough to inline
    return false;
  }

  /** Warns about an F word that is not a number or not a usable speed (the feed stays as it was). */
  private badFeed(): void {
    const f = this.vals[L_F];
    if (!(f === f)) this.warn('malformed-number', `Line ${this.lineNo}: F has no valid number; ignored.`);
    else this.warn('absurd-value', `Line ${this.lineNo}: feed F${f} is not a usable speed; ignored.`);
  }

  /** Warns about a present axis word that is not a number or out of ±maxAbs. */
  private badCoord(letter: number, maxAbs: number): void {
    const v = this.vals[letter];
    if (v !== v) this.warn('malformed-number', `Line ${this.lineNo}: ${String.fromCharCode(letter + 65)} has no valid number; ignored.`);
    else if (!(Math.abs(v) <= maxAbs)) this.warn('absurd-value', `Line ${this.lineNo}: ${String.fromCharCode(letter + 65)}${v} is out of range; ignored.`);
  }

  private motion(mode: number): void {
    // Feed (modal, shared by G0 and G1 in printer firmware).
    const u = this.unitMm;
    if (this.has(L_F)) {
      const f = this.vals[L_F] * u;
      if (f >= MIN_FEED_MM_MIN && f <= MAX_FEED_MM_MIN) this.feedMmMin = f;
      else this.badFeed(); // out of line: keeps motion() small
    }
    const rel = this.axisRelative;
    let tx = this.px;
    let ty = this.py;
    let tz = this.pz;
    const vals = this.vals;
    if (this.coordOk(L_X)) tx = rel ? this.px + vals[L_X] * u : vals[L_X] * u + this.ox;
    if (this.coordOk(L_Y)) ty = rel ? this.py + vals[L_Y] * u : vals[L_Y] * u + this.oy;
    if (this.coordOk(L_Z)) tz = rel ? this.pz + vals[L_Z] * u : vals[L_Z] * u + this.oz;
    let de = 0;
    if (this.coordOk(L_E, MAX_E_MM)) {
      const ve = vals[L_E] * u;
      if (rel || this.eModeRelative) {
        de = ve;
        this.eLogical += ve;
      } else {
        de = ve - this.eLogical;
        this.eLogical = ve;
      }
    }
    if (mode >= 2) {
      this.arc(mode === 2, tx, ty, tz, de);
      return;
    }
    // Straight move: the target goes through fields, not arguments (see emit()). Written out
    // rather than a call to linear(): measured ~3 % slower on the bench stack through linear().
    this.tx = tx;
    this.ty = ty;
    this.tz = tz;
    this.tde = de;
    this.emit();
  }

  /** Straight move to (tx, ty, tz) feeding de mm of filament (arc chords and fallbacks). */
  private linear(tx: number, ty: number, tz: number, de: number): void {
    this.tx = tx;
    this.ty = ty;
    this.tz = tz;
    this.tde = de;
    this.emit();
  }

  /** Target of the next straight move, read by emit(). */
  private tx = 0;
  private ty = 0;
  private tz = 0;
  private tde = 0;

  /**
   * Emits the straight move to the target fields. The target is not passed as arguments: V8 boxes
   * each double passed to a call it does not inline, and this one runs once per move (~170 MB of
   * garbage per 100 MB of G-code with arguments, measured with the sampling heap profiler).
   */
  private emit(): void {
    const tx = this.tx;
    const ty = this.ty;
    const tz = this.tz;
    const de = this.tde;
    const dx = tx - this.px;
    const dy = ty - this.py;
    const dz = tz - this.pz;
    const len = Math.sqrt(dx * dx + dy * dy + dz * dz);
    if (len === 0 && de === 0) return;
    const s = this.seg;
    s.x0 = this.px;
    s.y0 = this.py;
    s.z0 = this.pz;
    s.x1 = tx;
    s.y1 = ty;
    s.z1 = tz;
    s.lengthMm = len;
    s.eMm = de * this.flowFactor[this.tool];
    s.feedMms = (this.feedMmMin / 60) * this.speedFactor;
    s.extruding = s.eMm > 0 && len > 0;
    s.feature = this.trailingComment !== null ? (featureFromVerboseComment(this.trailingComment) ?? this.feature) : this.feature;
    s.tool = this.tool;
    s.lineNo = this.lineNo;
    this.px = tx;
    this.py = ty;
    this.pz = tz;
    this.stats.moves++;
    this.sink.segment(s);
  }

  /**
   * G2 (clockwise) / G3 (counter-clockwise) in the XY plane, centre from I/J (offsets from the start,
   * NISTIR 6556 §3.5.3.1 "center format") or radius R (§3.5.3.2 "radius format": positive R = arc of
   * at most 180°, negative R = more than 180°). Split into chords whose sagitta r(1 − cos(θ/2)) stays
   * within the arc tolerance; Z (helix) and E are spread evenly along the angle.
   */
  private arc(cw: boolean, tx: number, ty: number, tz: number, de: number): void {
    this.stats.arcs++;
    if (this.plane !== 17) {
      this.warn('arc-plane', `Line ${this.lineNo}: arcs outside the XY plane (G${this.plane}) are measured as straight lines.`);
      this.linear(tx, ty, tz, de);
      return;
    }
    const sx = this.px;
    const sy = this.py;
    const u = this.unitMm;
    let cx: number;
    let cy: number;
    if (this.has(L_R)) {
      const r0 = this.vals[L_R];
      if (!(r0 === r0) || !(Math.abs(r0) <= MAX_COORD_MM) || r0 === 0) {
        this.warn('bad-arc', `Line ${this.lineNo}: arc radius R is missing or invalid; measured as a straight line.`);
        this.linear(tx, ty, tz, de);
        return;
      }
      const r = r0 * u;
      const dx = tx - sx;
      const dy = ty - sy;
      const d = Math.sqrt(dx * dx + dy * dy);
      if (d === 0) {
        this.warn('bad-arc', `Line ${this.lineNo}: an R-form arc cannot end where it starts; ignored as a move.`);
        this.linear(tx, ty, tz, de);
        return;
      }
      let h2 = r * r - (d * d) / 4;
      if (h2 < 0) {
        if (h2 < -1e-3 * r * r) {
          this.warn('bad-arc', `Line ${this.lineNo}: arc radius ${Math.abs(r0)} is too small for its end point; measured as a straight line.`);
          this.linear(tx, ty, tz, de);
          return;
        }
        h2 = 0;
      }
      const h = Math.sqrt(h2);
      // Centre to the right of the chord for CW with R>0, to the left for CCW; negative R flips it.
      let side = cw ? 1 : -1;
      if (r < 0) side = -side;
      cx = sx + dx / 2 + (side * h * dy) / d;
      cy = sy + dy / 2 - (side * h * dx) / d;
    } else {
      const i = this.has(L_I) ? this.vals[L_I] : 0;
      const j = this.has(L_J) ? this.vals[L_J] : 0;
      if (!(i === i) || !(j === j) || Math.abs(i) > MAX_COORD_MM || Math.abs(j) > MAX_COORD_MM || (i === 0 && j === 0)) {
        this.warn('bad-arc', `Line ${this.lineNo}: arc centre I/J is missing or invalid; measured as a straight line.`);
        this.linear(tx, ty, tz, de);
        return;
      }
      cx = sx + i * u;
      cy = sy + j * u;
    }
    const r = Math.hypot(sx - cx, sy - cy);
    const a0 = Math.atan2(sy - cy, sx - cx);
    const a1 = Math.atan2(ty - cy, tx - cx);
    const TWO_PI = 2 * Math.PI;
    let sweep = cw ? a0 - a1 : a1 - a0;
    while (sweep <= 1e-12) sweep += TWO_PI;
    while (sweep > TWO_PI + 1e-12) sweep -= TWO_PI;
    if (Math.abs(tx - sx) < 1e-9 && Math.abs(ty - sy) < 1e-9) sweep = TWO_PI; // full circle
    const tol = this.arcTolMm;
    const maxStep = tol >= r ? Math.PI / 2 : Math.min(Math.PI / 2, 2 * Math.acos(1 - tol / r));
    let n = Math.ceil(sweep / maxStep);
    if (!(n >= 1)) n = 1;
    if (n > MAX_ARC_CHORDS) n = MAX_ARC_CHORDS;
    const r1 = Math.hypot(tx - cx, ty - cy);
    const z0 = this.pz;
    const dir = cw ? -1 : 1;
    const dePer = de / n;
    for (let k = 1; k <= n; k++) {
      let x: number;
      let y: number;
      if (k === n) {
        x = tx;
        y = ty;
      } else {
        const f = k / n;
        const a = a0 + dir * sweep * f;
        const rk = r + (r1 - r) * f;
        x = cx + rk * Math.cos(a);
        y = cy + rk * Math.sin(a);
      }
      this.linear(x, y, z0 + ((tz - z0) * k) / n, dePer);
    }
  }
}

function recordOverride(rec: ParserStats['speedFactor'], percent: number, lineNo: number): void {
  rec.count++;
  if (rec.max === null || percent > rec.max.percent) rec.max = { percent, lineNo };
  if (rec.min === null || percent < rec.min.percent) rec.min = { percent, lineNo };
}

function isTerminator(c: number): boolean {
  return c === SPACE || c === TAB || c === CR || c === LF || c === SEMI || c === LPAREN || c === STAR;
}


function isLetter(c: number): boolean {
  const l = c | 0x20;
  return l >= 97 && l <= 122;
}

/**
 * Node's Buffer decoders where they exist (found as a global, not imported: the engine also runs in
 * a browser Web Worker, where the loops below do the same). utf8Slice replaces invalid sequences
 * with U+FFFD, as TextDecoder does.
 */
const NodeBuffer = (globalThis as { Buffer?: { prototype: { latin1Slice?: (s: number, e: number) => string; utf8Slice?: (s: number, e: number) => string } } }).Buffer;
const nodeLatin1 = NodeBuffer?.prototype.latin1Slice;
const nodeUtf8 = NodeBuffer?.prototype.utf8Slice;

/** Bytes as one char each (command names, number words, Klipper arguments: ASCII in practice). */
function latin1(buf: Uint8Array, s: number, e: number): string {
  if (nodeLatin1) return nodeLatin1.call(buf, s, e);
  let out = '';
  for (let i = s; i < e; i++) out += String.fromCharCode(buf[i]);
  return out;
}

const UTF8 = new TextDecoder('utf-8');

/** Comment text, UTF-8. */
function utf8(buf: Uint8Array, s: number, e: number): string {
  if (nodeUtf8) return nodeUtf8.call(buf, s, e);
  let out = '';
  for (let i = s; i < e; i++) {
    const c = buf[i];
    if (c >= 0x80) return UTF8.decode(buf.subarray(s, e));
    out += String.fromCharCode(c);
  }
  return out;
}

function skipWord(buf: Uint8Array, i: number, end: number): number {
  while (i < end && !isTerminator(buf[i])) i++;
  return i;
}

/** Parses "KEY=VALUE KEY=VALUE" (Klipper extended commands) into numbers; bad values are skipped. */
function parseKeyValues(text: string): Map<string, number> {
  const out = new Map<string, number>();
  for (const part of text.trim().split(/\s+/)) {
    const eq = part.indexOf('=');
    if (eq <= 0) continue;
    const v = Number(part.slice(eq + 1));
    if (Number.isFinite(v)) out.set(part.slice(0, eq).toUpperCase(), v);
  }
  return out;
}

