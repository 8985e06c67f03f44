// C++ twin of lib/inspection/planner.ts: DEFAULT_LIMITS and refresh(); the per-move code (ring
// buffer, corner speeds, trapezoid times) is inline in planner.h.
#include "planner.h"

namespace hotlap {

// DEFAULT_LIMITS (planner.ts).
const MachineLimits kDefaultLimits = {
    3000,       // accelPrintMms2
    3000,       // accelTravelMms2
    3000,       // accelRetractMms2
    0.013,      // junctionDeviationMm
    std::nullopt,  // jerkXMms
    std::nullopt,  // jerkYMms
    0.4,        // jerkZMms
    5,          // jerkEMms
    INFINITY,   // maxFeedXMms
    INFINITY,   // maxFeedYMms
    INFINITY,   // maxFeedZMms
    INFINITY,   // maxFeedEMms
    INFINITY,   // maxAccelXMms2
    INFINITY,   // maxAccelYMms2
    INFINITY,   // maxAccelZMms2
    INFINITY,   // maxAccelEMms2
};


void PlannerLimits::refresh(const MachineState* m, const MachineLimits& b) {
  version = m != nullptr ? m->version : 0;
  // Base accelerations; the file's M204 values are read per move in push().
  aPrint = b.accelPrintMms2;
  aTravel = b.accelTravelMms2;
  aRetract = b.accelRetractMms2;
  jerkX = m != nullptr && m->jerkXMms ? m->jerkXMms : b.jerkXMms;
  jerkY = m != nullptr && m->jerkYMms ? m->jerkYMms : b.jerkYMms;
  jerkZ = m != nullptr && m->jerkZMms ? *m->jerkZMms : b.jerkZMms;
  jerkE = m != nullptr && m->jerkEMms ? *m->jerkEMms : b.jerkEMms;
  // Junction deviation from M205 J, else Klipper square_corner_velocity (converted per move), else base.
  scvJd = false;
  if (m != nullptr && m->junctionDeviationMm) {
    jd = *m->junctionDeviationMm;
    jerkX = std::nullopt;
    jerkY = std::nullopt;
  } else if (m != nullptr && m->squareCornerVelocityMms) {
    scvJd = true;
    jd = *m->squareCornerVelocityMms;
    jerkX = std::nullopt;
    jerkY = std::nullopt;
  } else {
    jd = b.junctionDeviationMm;
  }
  vx = m != nullptr && m->maxFeedXMms ? *m->maxFeedXMms : b.maxFeedXMms;
  vy = m != nullptr && m->maxFeedYMms ? *m->maxFeedYMms : b.maxFeedYMms;
  vz = m != nullptr && m->maxFeedZMms ? *m->maxFeedZMms : b.maxFeedZMms;
  ve = m != nullptr && m->maxFeedEMms ? *m->maxFeedEMms : b.maxFeedEMms;
  vMax = m != nullptr && m->maxVelocityMms ? *m->maxVelocityMms : INFINITY;
  ax = m != nullptr && m->maxAccelXMms2 ? *m->maxAccelXMms2 : b.maxAccelXMms2;
  ay = m != nullptr && m->maxAccelYMms2 ? *m->maxAccelYMms2 : b.maxAccelYMms2;
  az = m != nullptr && m->maxAccelZMms2 ? *m->maxAccelZMms2 : b.maxAccelZMms2;
  ae = m != nullptr && m->maxAccelEMms2 ? *m->maxAccelEMms2 : b.maxAccelEMms2;
  // `x !== Infinity` is true for NaN, as `x != INFINITY` is.
  axisCaps = vx != INFINITY || vy != INFINITY || vz != INFINITY || ve != INFINITY || vMax != INFINITY ||
             ax != INFINITY || ay != INFINITY || az != INFINITY || ae != INFINITY;
}




}  // namespace hotlap
