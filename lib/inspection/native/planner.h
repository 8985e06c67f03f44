// C++ twin of lib/inspection/planner.ts: print-time estimate with trapezoidal acceleration and
// cornering, in the style of the look-ahead planners in printer firmware (grbl/Marlin planner.cpp,
// Klipper toolhead.py):
//
// - every move gets a nominal speed (commanded feed capped by per-axis max feed M203 and Klipper
//   VELOCITY) and an acceleration (M204 print / travel / retract, capped by per-axis M201);
// - the speed allowed through a corner comes from junction deviation (Marlin M205 J, Klipper
//   square_corner_velocity) or, when the file sets classic jerk (M205 X/Y), from the per-axis speed
//   jump;
// - a backward pass over a bounded ring buffer lowers entry speeds so the machine can always stop by
//   the end of the buffer, and the forward pass at dequeue time caps them by what acceleration can
//   reach; each dequeued move is timed as a trapezoid (or triangle) velocity profile.
//
// The backward pass stops as soon as an entry speed no longer changes (a new move can only raise
// them), so the work per move is small and memory is a fixed set of arrays.
//
// The planner is a template on its sink (TS PlannedMoveSink) so the per-move planned() call is a
// direct, inlinable call rather than a virtual one; Measurements is the only sink.
#pragma once

#include <cmath>
#include <cstdint>
#include <optional>

#include "common.h"

namespace hotlap {

// Limits used when neither the file nor the options set them (TS MachineLimits).
struct MachineLimits {
  double accelPrintMms2;
  double accelTravelMms2;
  double accelRetractMms2;
  // Junction deviation (mm) used when the file sets no classic jerk.
  double junctionDeviationMm;
  // Classic jerk (mm/s); nullopt (null) = use junction deviation.
  std::optional<double> jerkXMms;
  std::optional<double> jerkYMms;
  double jerkZMms;
  double jerkEMms;
  double maxFeedXMms;
  double maxFeedYMms;
  double maxFeedZMms;
  double maxFeedEMms;
  double maxAccelXMms2;
  double maxAccelYMms2;
  double maxAccelZMms2;
  double maxAccelEMms2;
};

// DEFAULT_LIMITS: accelerations and junction deviation from memory of Marlin 2's example
// Configuration.h (3000 mm/s², JUNCTION_DEVIATION_MM 0.013, E jerk 5 mm/s); per-axis feed and
// acceleration caps left open (see planner.ts).
extern const MachineLimits kDefaultLimits;

// Time of one move: the trapezoid t = (vn−v0)/a + (vn−v1)/a + (L − d_acc − d_dec)/vn with
// d = (vn² − v²)/(2a), or the triangle with peak vp² = (2aL + v0² + v1²)/2 when the cruise speed is
// not reached (constant-acceleration kinematics, v² = v0² + 2ad).
inline double trapezoidTimeS(double v0sq, double v1sq, double vnsq, double a, double L) {
  if (L <= 0) return 0;
  const double vn = std::sqrt(vnsq);
  if (!(a > 0) || !std::isfinite(a)) return L / vn;
  const double v0 = std::sqrt(v0sq);
  const double v1 = std::sqrt(v1sq);
  const double da = (vnsq - v0sq) / (2 * a);
  const double dd = (vnsq - v1sq) / (2 * a);
  if (da + dd <= L) return (vn - v0) / a + (vn - v1) / a + (L - da - dd) / vn;
  double vpsq = (2 * a * L + v0sq + v1sq) / 2;
  const double floor = v0sq > v1sq ? v0sq : v1sq;
  if (vpsq < floor) vpsq = floor;
  const double vp = std::sqrt(vpsq);
  return (vp - v0) / a + (vp - v1) / a;
}

// Effective limits derived from MachineState + base limits (the TS planner's cached fields,
// refreshed when MachineState.version changes).
struct PlannerLimits {
  int version = -1;
  double aPrint = 0, aTravel = 0, aRetract = 0;
  double jd = 0;
  bool scvJd = false;
  std::optional<double> jerkX, jerkY;
  double jerkZ = 0, jerkE = 0;
  double vx = 0, vy = 0, vz = 0, ve = 0;
  double vMax = INFINITY;
  double ax = 0, ay = 0, az = 0, ae = 0;
  // False when no per-axis feed or acceleration cap is finite (skips that arithmetic).
  bool axisCaps = true;
  // refresh() of planner.ts.
  void refresh(const MachineState* m, const MachineLimits& b);
};

// Moves in the look-ahead window; 128 as in planner.ts (RING).
constexpr int kPlannerRing = engine::PLANNER_RING;
constexpr int kPlannerMask = kPlannerRing - 1;

// Corner helpers of planner.ts that do not depend on the sink (defined below).
struct PlannerCorner {
  // The move being added (unit XYZ, E per mm, nominal speed, acceleration).
  double cux = 0, cuy = 0, cuz = 0, cue = 0, cv = 0, ca = 0;
  // Previous move direction (unit XYZ), E per mm, nominal speed.
  double pux = 0, puy = 0, puz = 0, pue = 0, pv = 0;
  // safeInto / junctionInto / jerkJunctionInto return the entry speed² (TS writes maxEntryV2[idx]).
  double safeV2(const PlannerLimits& l) const;
  double junctionV2(const PlannerLimits& l) const;
  double jerkJunctionV2(const PlannerLimits& l) const;
};

// safeInto: entry speed² from a standstill: classic jerk lets a move start at the jerk speed; JD starts at 0.
inline double PlannerCorner::safeV2(const PlannerLimits& l) const {
  if (!l.jerkX) return 0;
  double s = cv;
  const double jx = *l.jerkX;
  const double jy = l.jerkY ? *l.jerkY : jx;
  const double aux = std::fabs(cux);
  const double auy = std::fabs(cuy);
  const double auz = std::fabs(cuz);
  const double aue = std::fabs(cue);
  if (aux * s > jx) s = jx / aux;
  if (auy * s > jy) s = jy / auy;
  if (auz * s > l.jerkZ) s = l.jerkZ / auz;
  if (aue * s > l.jerkE) s = l.jerkE / aue;
  return s * s;
}

// junctionInto: largest speed² through the corner between the previous move and this one.
inline double PlannerCorner::junctionV2(const PlannerLimits& l) const {
  if (l.jerkX) return jerkJunctionV2(l);
  // Junction deviation (grbl / Marlin JUNCTION_DEVIATION): v² = a·δ·sin(θ/2) / (1 − sin(θ/2)).
  const double v = cv;
  const double vcap = v < pv ? v : pv;
  const double c2 = vcap * vcap;
  const double cosTheta = -(pux * cux + puy * cuy + puz * cuz);
  double vj2;
  if (cosTheta < -0.999999) {
    vj2 = c2;  // straight on
  } else if (cosTheta > 0.999999) {
    vj2 = 0;  // full reversal
  } else {
    const double sinHalf = std::sqrt(0.5 * (1 - cosTheta));
    // Klipper: junction_deviation = scv² (√2 − 1) / accel, so v² = scv² (√2 − 1) sin/(1 − sin).
    vj2 = l.scvJd ? (l.jd * l.jd * (M_SQRT2 - 1) * sinHalf) / (1 - sinHalf) : (ca * l.jd * sinHalf) / (1 - sinHalf);
    if (vj2 > c2) vj2 = c2;
  }
  return vj2;
}

// jerkJunctionInto: classic jerk (Marlin planner.cpp, non-JD branch): scale the junction speed until
// no axis jumps by more than its jerk; opposite-sign components count by the larger magnitude.
inline double PlannerCorner::jerkJunctionV2(const PlannerLimits& l) const {
  const double v = cv;
  const double vcap = v < pv ? v : pv;
  const double jx = *l.jerkX;
  // The TypeScript fills jerkScratch[12] (exit, entry, limit per axis X, Y, Z, E) and loops over
  // it; here the four axes are unrolled in the same order with the same operations.
  double f = 1;
  auto axis = [&f](double vExit, double vEntry, double limit) {
    // Speed jump of one axis between exit velocity vExit and entry velocity vEntry.
    double jerk;
    if (vExit > vEntry) jerk = vEntry > 0 || vExit < 0 ? vExit - vEntry : jsMax(vExit, -vEntry);
    else jerk = vEntry < 0 || vExit > 0 ? vEntry - vExit : jsMax(-vExit, vEntry);
    jerk *= f;
    if (jerk > limit) f = (f * limit) / jerk;
  };
  axis(pux * vcap, cux * vcap, jx);
  axis(puy * vcap, cuy * vcap, l.jerkY ? *l.jerkY : jx);
  axis(puz * vcap, cuz * vcap, l.jerkZ);
  axis(pue * vcap, cue * vcap, l.jerkE);
  const double vj = vcap * f;
  return vj * vj;
}

template <class Sink>
class MotionPlanner {
 public:
  MotionPlanner(Sink* out, const MachineState* machine, const MachineLimits& base)
      : out_(out), machine_(machine), base_(base) {
    lim_.refresh(machine_, base_);
  }

  // Total planned time, s.
  double totalS = 0;
  double dwellS = 0;
  // Flow of the next move (mm³/s), passed through to the sink with its final duration.
  double nextFlowMm3s = 0;

  // Adds one move (set nextFlowMm3s first); layerIndex is passed through to the sink.
  void push(const Segment& s, int32_t layerIndex) {
    if (machine_ != nullptr && machine_->version != lim_.version) lim_.refresh(machine_, base_);
    const double L = s.lengthMm;
    double feed = s.feedMms;
    if (!(feed > 0)) return;
    if (count_ == kPlannerRing) dequeue();
    const int idx = (head_ + count_) & kPlannerMask;
    flow_[idx] = nextFlowMm3s;
    layer_[idx] = layerIndex;
    if (L > 0) {
      const double inv = 1 / L;
      const double ux = (s.x1 - s.x0) * inv;
      const double uy = (s.y1 - s.y0) * inv;
      const double uz = (s.z1 - s.z0) * inv;
      const double ue = s.eMm * inv;
      // Per-axis feed caps: |u_axis| · v ≤ vmax_axis (Marlin planner "speed_factor").
      const double aux = ux < 0 ? -ux : ux;
      const double auy = uy < 0 ? -uy : uy;
      const double auz = uz < 0 ? -uz : uz;
      const double aue = ue < 0 ? -ue : ue;
      const MachineState* m = machine_;
      double a;
      if (s.eMm > 0) a = m != nullptr && m->accelPrintMms2 ? *m->accelPrintMms2 : lim_.aPrint;
      else a = m != nullptr && m->accelTravelMms2 ? *m->accelTravelMms2 : lim_.aTravel;
      if (lim_.axisCaps) {
        if (aux * feed > lim_.vx) feed = lim_.vx / aux;
        if (auy * feed > lim_.vy) feed = lim_.vy / auy;
        if (auz * feed > lim_.vz) feed = lim_.vz / auz;
        if (aue * feed > lim_.ve) feed = lim_.ve / aue;
        if (feed > lim_.vMax) feed = lim_.vMax;
        if (aux * a > lim_.ax) a = lim_.ax / aux;
        if (auy * a > lim_.ay) a = lim_.ay / auy;
        if (auz * a > lim_.az) a = lim_.az / auz;
        if (aue * a > lim_.ae) a = lim_.ae / aue;
      }
      lenMm_[idx] = L;
      accel_[idx] = a;
      nomV2_[idx] = feed * feed;
      c_.cux = ux;
      c_.cuy = uy;
      c_.cuz = uz;
      c_.cue = ue;
      c_.cv = feed;
      c_.ca = a;
      maxEntryV2_[idx] = prevKind_ == 1 ? c_.junctionV2(lim_) : c_.safeV2(lim_);
      enqueue(idx);
      c_.pux = ux;
      c_.puy = uy;
      c_.puz = uz;
      c_.pue = ue;
      c_.pv = feed;
      prevKind_ = 1;
    } else {
      // Extruder-only move (retract / unretract): length is filament length at the E feed.
      const double eLen = s.eMm < 0 ? -s.eMm : s.eMm;
      if (eLen == 0) return;
      if (feed > lim_.ve) feed = lim_.ve;
      double a = machine_ != nullptr && machine_->accelRetractMms2 ? *machine_->accelRetractMms2 : lim_.aRetract;
      if (a > lim_.ae) a = lim_.ae;
      // From a standstill an E-only move may start at the E jerk in classic-jerk mode; JD starts at 0.
      const double j = !lim_.jerkX ? 0 : lim_.jerkE;
      const double vj = j < feed ? j : feed;
      lenMm_[idx] = eLen;
      accel_[idx] = a;
      nomV2_[idx] = feed * feed;
      maxEntryV2_[idx] = prevKind_ == 1 ? 0 : vj * vj;
      enqueue(idx);
      prevKind_ = 2;
      c_.pv = feed;
    }
  }

  // Stops the machine (end of file, dwell): every queued move is timed with a final stop.
  void flush() {
    // Moves decelerate to zero at the last one: backV2 already assumes that.
    while (count_ > 0) dequeue();
    prevKind_ = 0;
  }

  // G4: wait for the queue to empty, then pause.
  void dwell(double timeS, int32_t layerIndex) {
    flush();
    totalS += timeS;
    dwellS += timeS;
    out_->planned(timeS, 0, layerIndex);
  }

 private:
  Sink* out_;
  const MachineState* machine_;
  MachineLimits base_;
  PlannerLimits lim_;
  PlannerCorner c_;

  // Ring buffer (structure of arrays).
  double lenMm_[kPlannerRing] = {};
  double accel_[kPlannerRing] = {};
  double nomV2_[kPlannerRing] = {};
  double maxEntryV2_[kPlannerRing] = {};
  double backV2_[kPlannerRing] = {};
  double entryV2_[kPlannerRing] = {};
  double flow_[kPlannerRing] = {};
  int32_t layer_[kPlannerRing] = {};
  int head_ = 0;
  int count_ = 0;
  // 0 = none/stop, 1 = XYZ move, 2 = E-only.
  int prevKind_ = 0;

  // Completes the move written at ring slot idx (the tail) and runs the backward pass.
  void enqueue(int idx) {
    double vj2 = maxEntryV2_[idx];
    const double vn2 = nomV2_[idx];
    if (vj2 > vn2) maxEntryV2_[idx] = vj2 = vn2;
    const double stop = 2 * accel_[idx] * lenMm_[idx];  // entry speed² from which it can stop within this move
    backV2_[idx] = vj2 < stop ? vj2 : stop;
    if (count_ == 0) entryV2_[idx] = vj2;
    count_++;
    // Backward pass: raise earlier entry limits now that the stop point moved one move further away.
    int next = idx;
    for (int k = count_ - 2; k >= 0; k--) {
      const int i = (head_ + k) & kPlannerMask;
      const double reach = backV2_[next] + 2 * accel_[i] * lenMm_[i];
      const double cap = maxEntryV2_[i];
      const double nb = reach < cap ? reach : cap;
      if (nb <= backV2_[i]) break;
      backV2_[i] = nb;
      next = i;
    }
  }

  void dequeue() {
    const int h = head_;
    const double L = lenMm_[h];
    const double a = accel_[h];
    double v0 = entryV2_[h];
    if (v0 > backV2_[h]) v0 = backV2_[h];
    double v1 = 0;
    if (count_ > 1) {
      const int n = (h + 1) & kPlannerMask;
      v1 = backV2_[n];
      const double reach = v0 + 2 * a * L;
      if (reach < v1) v1 = reach;
      entryV2_[n] = v1;
    }
    const double t = trapezoidTimeS(v0, v1, nomV2_[h], a, L);
    totalS += t;
    out_->planned(t, flow_[h], layer_[h]);
    head_ = (h + 1) & kPlannerMask;
    count_--;
  }
};

}  // namespace hotlap
