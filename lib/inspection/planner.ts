/**
 * Print-time estimate with trapezoidal acceleration and cornering, in the style of the look-ahead
 * planners in printer firmware (grbl/Marlin planner.cpp, Klipper toolhead.py):
 *
 * - every move gets a nominal speed (commanded feed capped by per-axis max feed M203 and Klipper
 *   VELOCITY) and an acceleration (M204 print / travel / retract, capped by per-axis M201);
 * - the speed allowed through a corner comes from junction deviation (Marlin M205 J, Klipper
 *   square_corner_velocity) or, when the file sets classic jerk (M205 X/Y), from the per-axis speed
 *   jump;
 * - a backward pass over a bounded ring buffer lowers entry speeds so the machine can always stop by
 *   the end of the buffer, and the forward pass at dequeue time caps them by what acceleration can
 *   reach; each dequeued move is timed as a trapezoid (or triangle) velocity profile.
 *
 * The backward pass stops as soon as an entry speed no longer changes (a new move can only raise
 * them), so the work per move is small and memory is a fixed set of typed arrays.
 */
import type { Segment } from './types';
import type { MachineState } from './parser';
import * as C from './engineConstants';

/** Limits used when neither the file nor the options set them. */
export interface MachineLimits {
  accelPrintMms2: number;
  accelTravelMms2: number;
  accelRetractMms2: number;
  /** Junction deviation (mm) used when the file sets no classic jerk. */
  junctionDeviationMm: number;
  /** Classic jerk (mm/s); null = use junction deviation. */
  jerkXMms: number | null;
  jerkYMms: number | null;
  jerkZMms: number;
  jerkEMms: number;
  maxFeedXMms: number;
  maxFeedYMms: number;
  maxFeedZMms: number;
  maxFeedEMms: number;
  maxAccelXMms2: number;
  maxAccelYMms2: number;
  maxAccelZMms2: number;
  maxAccelEMms2: number;
}

/**
 * Defaults when the file sets nothing: accelerations and junction deviation from memory of Marlin 2's
 * example Configuration.h (DEFAULT_ACCELERATION / DEFAULT_TRAVEL_ACCELERATION /
 * DEFAULT_RETRACT_ACCELERATION 3000 mm/s², JUNCTION_DEVIATION_MM 0.013, E jerk 5 mm/s). Per-axis
 * feed and acceleration caps are left open: without M201/M203 in the file we do not know the
 * machine, and an estimate used to spot impossible claimed times must not invent a slower machine
 * than the one the slicer planned for. Callers can pass real machine limits as options.
 */
export const DEFAULT_LIMITS: MachineLimits = {
  accelPrintMms2: 3000,
  accelTravelMms2: 3000,
  accelRetractMms2: 3000,
  junctionDeviationMm: 0.013,
  jerkXMms: null,
  jerkYMms: null,
  jerkZMms: 0.4,
  jerkEMms: 5,
  maxFeedXMms: Infinity,
  maxFeedYMms: Infinity,
  maxFeedZMms: Infinity,
  maxFeedEMms: Infinity,
  maxAccelXMms2: Infinity,
  maxAccelYMms2: Infinity,
  maxAccelZMms2: Infinity,
  maxAccelEMms2: Infinity,
};

/** Receives every move once its duration is final. */
export interface PlannedMoveSink {
  planned(timeS: number, flowMm3s: number, layerIndex: number): void;
}

const RING = C.PLANNER_RING;
const MASK = RING - 1;

/**
 * Time of one move with entry/exit speeds² v0², v1², cruise speed² vn², acceleration a and length L:
 * the trapezoid t = (vn−v0)/a + (vn−v1)/a + (L − d_acc − d_dec)/vn with d = (vn² − v²)/(2a),
 * or the triangle with peak vp² = (2aL + v0² + v1²)/2 when the cruise speed is not reached
 * (constant-acceleration kinematics, v² = v0² + 2ad).
 */
export function trapezoidTimeS(v0sq: number, v1sq: number, vnsq: number, a: number, L: number): number {
  if (L <= 0) return 0;
  const vn = Math.sqrt(vnsq);
  if (!(a > 0) || !Number.isFinite(a)) return L / vn;
  const v0 = Math.sqrt(v0sq);
  const v1 = Math.sqrt(v1sq);
  const da = (vnsq - v0sq) / (2 * a);
  const dd = (vnsq - v1sq) / (2 * a);
  if (da + dd <= L) return (vn - v0) / a + (vn - v1) / a + (L - da - dd) / vn;
  let vpsq = (2 * a * L + v0sq + v1sq) / 2;
  const floor = v0sq > v1sq ? v0sq : v1sq;
  if (vpsq < floor) vpsq = floor;
  const vp = Math.sqrt(vpsq);
  return (vp - v0) / a + (vp - v1) / a;
}

export class MotionPlanner {
  private readonly out: PlannedMoveSink;
  private readonly machine: MachineState | null;
  private readonly base: MachineLimits;

  // Ring buffer (structure of arrays).
  private readonly lenMm = new Float64Array(RING);
  private readonly accel = new Float64Array(RING);
  private readonly nomV2 = new Float64Array(RING);
  private readonly maxEntryV2 = new Float64Array(RING);
  private readonly backV2 = new Float64Array(RING);
  private readonly entryV2 = new Float64Array(RING);
  private readonly flow = new Float64Array(RING);
  private readonly layer = new Int32Array(RING);
  private head = 0;
  private count = 0;

  // Previous move direction (unit XYZ), E per mm, nominal speed; prevKind 0 = none/stop, 1 = XYZ move, 2 = E-only.
  private pux = 0;
  private puy = 0;
  private puz = 0;
  private pue = 0;
  private pv = 0;
  private prevKind = 0;
  // The move being added (unit XYZ, E per mm, nominal speed, acceleration), for the corner helpers.
  private cux = 0;
  private cuy = 0;
  private cuz = 0;
  private cue = 0;
  private cv = 0;
  private ca = 0;
  /** Exit, entry and limit per axis for the classic-jerk corner. */
  private readonly jerkScratch = new Float64Array(12);

  // Effective limits, refreshed when MachineState.version changes.
  private version = -1;
  private aPrint = 0;
  private aTravel = 0;
  private aRetract = 0;
  private jd = 0;
  private scvJd = false;
  private jerkX: number | null = null;
  private jerkY: number | null = null;
  private jerkZ = 0;
  private jerkE = 0;
  private vx = 0;
  private vy = 0;
  private vz = 0;
  private ve = 0;
  private vMax = Infinity;
  private ax = 0;
  private ay = 0;
  private az = 0;
  private ae = 0;
  /** False when no per-axis feed or acceleration cap is finite (skips that arithmetic). */
  private axisCaps = true;

  /** Total planned time, s. */
  totalS = 0;
  dwellS = 0;

  constructor(out: PlannedMoveSink, machine: MachineState | null, base: MachineLimits = DEFAULT_LIMITS) {
    this.out = out;
    this.machine = machine;
    this.base = base;
    this.refresh();
  }

  private refresh(): void {
    const m = this.machine;
    const b = this.base;
    this.version = m ? m.version : 0;
    // Base accelerations; the file's M204 values are read per move in push().
    this.aPrint = b.accelPrintMms2;
    this.aTravel = b.accelTravelMms2;
    this.aRetract = b.accelRetractMms2;
    this.jerkX = m?.jerkXMms ?? b.jerkXMms;
    this.jerkY = m?.jerkYMms ?? b.jerkYMms;
    this.jerkZ = m?.jerkZMms ?? b.jerkZMms;
    this.jerkE = m?.jerkEMms ?? b.jerkEMms;
    // Junction deviation from M205 J, else Klipper square_corner_velocity (converted per move), else base.
    this.scvJd = false;
    if (m?.junctionDeviationMm != null) {
      this.jd = m.junctionDeviationMm;
      this.jerkX = null;
      this.jerkY = null;
    } else if (m?.squareCornerVelocityMms != null) {
      this.scvJd = true;
      this.jd = m.squareCornerVelocityMms;
      this.jerkX = null;
      this.jerkY = null;
    } else {
      this.jd = b.junctionDeviationMm;
    }
    this.vx = m?.maxFeedXMms ?? b.maxFeedXMms;
    this.vy = m?.maxFeedYMms ?? b.maxFeedYMms;
    this.vz = m?.maxFeedZMms ?? b.maxFeedZMms;
    this.ve = m?.maxFeedEMms ?? b.maxFeedEMms;
    this.vMax = m?.maxVelocityMms ?? Infinity;
    this.ax = m?.maxAccelXMms2 ?? b.maxAccelXMms2;
    this.ay = m?.maxAccelYMms2 ?? b.maxAccelYMms2;
    this.az = m?.maxAccelZMms2 ?? b.maxAccelZMms2;
    this.ae = m?.maxAccelEMms2 ?? b.maxAccelEMms2;
    this.axisCaps =
      this.vx !== Infinity ||
      this.vy !== Infinity ||
      this.vz !== Infinity ||
      this.ve !== Infinity ||
      this.vMax !== Infinity ||
      this.ax !== Infinity ||
      this.ay !== Infinity ||
      this.az !== Infinity ||
      this.ae !== Infinity;
  }

  /**
   * Flow of the next move (mm³/s), passed through to the sink with its final duration. A field
   * rather than an argument: V8 boxes a double passed to a call it does not inline, once per move.
   */
  nextFlowMm3s = 0;

  /** Adds one move (set nextFlowMm3s first); layerIndex is passed through to the sink. */
  push(s: Segment, layerIndex: number): void {
    if (this.machine && this.machine.version !== this.version) this.refresh();
    const L = s.lengthMm;
    let feed = s.feedMms;
    if (!(feed > 0)) return;
    if (this.count === RING) this.dequeue();
    const idx = (this.head + this.count) & MASK;
    this.flow[idx] = this.nextFlowMm3s;
    this.layer[idx] = layerIndex;
    if (L > 0) {
      const inv = 1 / L;
      const ux = (s.x1 - s.x0) * inv;
      const uy = (s.y1 - s.y0) * inv;
      const uz = (s.z1 - s.z0) * inv;
      const ue = s.eMm * inv;
      // Per-axis feed caps: |u_axis| · v ≤ vmax_axis (Marlin planner "speed_factor").
      const aux = ux < 0 ? -ux : ux;
      const auy = uy < 0 ? -uy : uy;
      const auz = uz < 0 ? -uz : uz;
      const aue = ue < 0 ? -ue : ue;
      const m = this.machine;
      let a = s.eMm > 0 ? (m?.accelPrintMms2 ?? this.aPrint) : (m?.accelTravelMms2 ?? this.aTravel);
      if (this.axisCaps) {
        if (aux * feed > this.vx) feed = this.vx / aux;
        if (auy * feed > this.vy) feed = this.vy / auy;
        if (auz * feed > this.vz) feed = this.vz / auz;
        if (aue * feed > this.ve) feed = this.ve / aue;
        if (feed > this.vMax) feed = this.vMax;
        if (aux * a > this.ax) a = this.ax / aux;
        if (auy * a > this.ay) a = this.ay / auy;
        if (auz * a > this.az) a = this.az / auz;
        if (aue * a > this.ae) a = this.ae / aue;
      }
      this.lenMm[idx] = L;
      this.accel[idx] = a;
      this.nomV2[idx] = feed * feed;
      // The corner and start-speed helpers read the move from fields and write maxEntryV2[idx]
      // themselves: doubles passed to or returned from a call V8 does not inline are boxed, which
      // cost one allocation per argument per move (~200 MB of garbage per 100 MB of G-code, measured
      // with the sampling heap profiler).
      this.cux = ux;
      this.cuy = uy;
      this.cuz = uz;
      this.cue = ue;
      this.cv = feed;
      this.ca = a;
      if (this.prevKind === 1) this.junctionInto(idx);
      else this.safeInto(idx);
      this.enqueue(idx);
      this.pux = ux;
      this.puy = uy;
      this.puz = uz;
      this.pue = ue;
      this.pv = feed;
      this.prevKind = 1;
    } else {
      // Extruder-only move (retract / unretract): length is filament length at the E feed.
      const eLen = s.eMm < 0 ? -s.eMm : s.eMm;
      if (eLen === 0) return;
      if (feed > this.ve) feed = this.ve;
      let a = this.machine?.accelRetractMms2 ?? this.aRetract;
      if (a > this.ae) a = this.ae;
      // From a standstill an E-only move may start at the E jerk in classic-jerk mode; JD starts at 0.
      const j = this.jerkX === null ? 0 : this.jerkE;
      const vj = j < feed ? j : feed;
      this.lenMm[idx] = eLen;
      this.accel[idx] = a;
      this.nomV2[idx] = feed * feed;
      this.maxEntryV2[idx] = this.prevKind === 1 ? 0 : vj * vj;
      this.enqueue(idx);
      this.prevKind = 2;
      this.pv = feed;
    }
  }

  /** Entry speed² from a standstill into maxEntryV2[idx]: classic jerk lets a move start at the jerk speed; JD starts at 0. */
  private safeInto(idx: number): void {
    if (this.jerkX === null) {
      this.maxEntryV2[idx] = 0;
      return;
    }
    let s = this.cv;
    const jx = this.jerkX;
    const jy = this.jerkY ?? jx;
    const aux = Math.abs(this.cux);
    const auy = Math.abs(this.cuy);
    const auz = Math.abs(this.cuz);
    const aue = Math.abs(this.cue);
    if (aux * s > jx) s = jx / aux;
    if (auy * s > jy) s = jy / auy;
    if (auz * s > this.jerkZ) s = this.jerkZ / auz;
    if (aue * s > this.jerkE) s = this.jerkE / aue;
    this.maxEntryV2[idx] = s * s;
  }

  /** Largest speed² through the corner between the previous move and this one, into maxEntryV2[idx]. */
  private junctionInto(idx: number): void {
    if (this.jerkX !== null) {
      this.jerkJunctionInto(idx);
      return;
    }
    // Junction deviation (grbl / Marlin JUNCTION_DEVIATION): v² = a·δ·sin(θ/2) / (1 − sin(θ/2)).
    // Kept short so V8 inlines it into push(); classic jerk has its own method.
    const v = this.cv;
    const pv = this.pv;
    const vcap = v < pv ? v : pv;
    const c2 = vcap * vcap;
    const cosTheta = -(this.pux * this.cux + this.puy * this.cuy + this.puz * this.cuz);
    let vj2: number;
    if (cosTheta < -0.999999) vj2 = c2; // straight on
    else if (cosTheta > 0.999999) vj2 = 0; // full reversal
    else {
      const sinHalf = Math.sqrt(0.5 * (1 - cosTheta));
      // Klipper: junction_deviation = scv² (√2 − 1) / accel, so v² = scv² (√2 − 1) sin/(1 − sin).
      vj2 = this.scvJd ? (this.jd * this.jd * (Math.SQRT2 - 1) * sinHalf) / (1 - sinHalf) : (this.ca * this.jd * sinHalf) / (1 - sinHalf);
      if (vj2 > c2) vj2 = c2;
    }
    this.maxEntryV2[idx] = vj2;
  }

  /**
   * Classic jerk (Marlin planner.cpp, non-JD branch): scale the junction speed until no axis jumps
   * by more than its jerk; opposite-sign components count by the larger magnitude.
   */
  private jerkJunctionInto(idx: number): void {
    const v = this.cv;
    const pv = this.pv;
    const vcap = v < pv ? v : pv;
    const jx = this.jerkX as number;
    const j = this.jerkScratch;
    j[0] = this.pux * vcap;
    j[1] = this.cux * vcap;
    j[2] = jx;
    j[3] = this.puy * vcap;
    j[4] = this.cuy * vcap;
    j[5] = this.jerkY ?? jx;
    j[6] = this.puz * vcap;
    j[7] = this.cuz * vcap;
    j[8] = this.jerkZ;
    j[9] = this.pue * vcap;
    j[10] = this.cue * vcap;
    j[11] = this.jerkE;
    let f = 1;
    for (let k = 0; k < 12; k += 3) {
      // Speed jump of one axis between exit velocity vExit and entry velocity vEntry.
      const vExit = j[k];
      const vEntry = j[k + 1];
      let jerk: number;
      if (vExit > vEntry) jerk = vEntry > 0 || vExit < 0 ? vExit - vEntry : Math.max(vExit, -vEntry);
      else jerk = vEntry < 0 || vExit > 0 ? vEntry - vExit : Math.max(-vExit, vEntry);
      jerk *= f;
      if (jerk > j[k + 2]) f = (f * j[k + 2]) / jerk;
    }
    const vj = vcap * f;
    this.maxEntryV2[idx] = vj * vj;
  }

  /** Completes the move written at ring slot idx (the tail) and runs the backward pass. */
  private enqueue(idx: number): void {
    let vj2 = this.maxEntryV2[idx];
    const vn2 = this.nomV2[idx];
    if (vj2 > vn2) this.maxEntryV2[idx] = vj2 = vn2;
    const stop = 2 * this.accel[idx] * this.lenMm[idx]; // entry speed² from which it can stop within this move
    this.backV2[idx] = vj2 < stop ? vj2 : stop;
    if (this.count === 0) this.entryV2[idx] = vj2;
    this.count++;
    // Backward pass: raise earlier entry limits now that the stop point moved one move further away.
    let next = idx;
    for (let k = this.count - 2; k >= 0; k--) {
      const i = (this.head + k) & MASK;
      const reach = this.backV2[next] + 2 * this.accel[i] * this.lenMm[i];
      const cap = this.maxEntryV2[i];
      const nb = reach < cap ? reach : cap;
      if (nb <= this.backV2[i]) break;
      this.backV2[i] = nb;
      next = i;
    }
  }

  private dequeue(): void {
    const h = this.head;
    const L = this.lenMm[h];
    const a = this.accel[h];
    let v0 = this.entryV2[h];
    if (v0 > this.backV2[h]) v0 = this.backV2[h];
    let v1 = 0;
    if (this.count > 1) {
      const n = (h + 1) & MASK;
      v1 = this.backV2[n];
      const reach = v0 + 2 * a * L;
      if (reach < v1) v1 = reach;
      this.entryV2[n] = v1;
    }
    const t = trapezoidTimeS(v0, v1, this.nomV2[h], a, L);
    this.totalS += t;
    this.out.planned(t, this.flow[h], this.layer[h]);
    this.head = (h + 1) & MASK;
    this.count--;
  }

  /** Stops the machine (end of file, dwell): every queued move is timed with a final stop. */
  flush(): void {
    // Moves decelerate to zero at the last one: backV2 already assumes that.
    while (this.count > 0) this.dequeue();
    this.prevKind = 0;
  }

  /** G4: wait for the queue to empty, then pause. */
  dwell(timeS: number, layerIndex: number): void {
    this.flush();
    this.totalS += timeS;
    this.dwellS += timeS;
    this.out.planned(timeS, 0, layerIndex);
  }
}
