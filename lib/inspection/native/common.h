// Shared contract of the native inspection engine: the C++ twin of lib/inspection/types.ts and of
// the parts of parser.ts the analyzers read (MachineState). The TypeScript engine is the reference;
// every class here mirrors one TypeScript module operation for operation, so both give the same
// report (tests/unit/inspection/native.test.ts compares them).
#pragma once

#include <charconv>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "engine_constants.h"

namespace hotlap {

// FEATURE_KINDS in lib/inspection/types.ts, same order. A Segment's feature is an index into it, or
// kFeatureNone (null in TypeScript).
constexpr int kFeatureCount = 12;
constexpr int kFeatureNone = -1;
inline const char* const kFeatureNames[kFeatureCount] = {
    "outer-wall", "inner-wall", "overhang-wall", "sparse-infill", "solid-infill", "top-solid",
    "bottom-solid", "bridge", "skirt", "support", "gap-fill", "other"};
// Indices into kFeatureNames.
enum Feature : int {
  F_OUTER_WALL, F_INNER_WALL, F_OVERHANG_WALL, F_SPARSE_INFILL, F_SOLID_INFILL, F_TOP_SOLID,
  F_BOTTOM_SOLID, F_BRIDGE, F_SKIRT, F_SUPPORT, F_GAP_FILL, F_OTHER
};
static_assert(F_OTHER + 1 == kFeatureCount, "one index per feature name");

// One straight move after all modal state is resolved (types.ts Segment). The parser hands the same
// object to every callback and overwrites it on the next move.
struct Segment {
  double x0 = 0, y0 = 0, z0 = 0, x1 = 0, y1 = 0, z1 = 0;
  double lengthMm = 0;
  double eMm = 0;
  double feedMms = 0;
  bool extruding = false;
  int feature = kFeatureNone;
  int tool = 0;
  double lineNo = 0;
};

// Consumer of the parsed stream (types.ts SegmentSink + parser.ts MotionSink).
struct MotionSink {
  virtual ~MotionSink() = default;
  virtual void segment(const Segment& s) = 0;
  // Comment text as bytes (the TypeScript parser decodes the same range as UTF-8).
  virtual void comment(const char* text, size_t len, double lineNo) = 0;
  virtual void dwell(double timeS, double lineNo) = 0;
  virtual void end() = 0;
};

// The motion limits of parser.ts MachineState, as set in the file; nullopt = not set (null). What
// the planner reads; copied on its own to the worker thread (addon.cc).
struct MotionLimits {
  std::optional<double> accelPrintMms2, accelTravelMms2, accelRetractMms2, accelToDecelMms2,
      minimumCruiseRatio, jerkXMms, jerkYMms, jerkZMms, jerkEMms, junctionDeviationMm,
      squareCornerVelocityMms, maxFeedXMms, maxFeedYMms, maxFeedZMms, maxFeedEMms, maxVelocityMms,
      maxAccelXMms2, maxAccelYMms2, maxAccelZMms2, maxAccelEMms2;
  // Bumped on every change except accelerations (read per move).
  int version = 0;
};

// parser.ts MachineState: the limits and which commands set them.
struct MachineState : MotionLimits {
  // C++ only: bumped by every M204 (which sets accelerations without a version bump), so the
  // pipeline in addon.cc checks two counters per move instead of comparing the limits.
  int accelWrites = 0;
  // Insertion-ordered set of the command families that set limits.
  std::vector<std::string> setBy;
  std::string lastMark;
  void mark(const std::string& command) {
    if (command == lastMark) return;
    lastMark = command;
    for (const auto& s : setBy)
      if (s == command) return;
    setBy.push_back(command);
  }
};

// materials.ts filamentAreaMm2: cross-section of round filament, π (d/2)², mm².
inline double filamentAreaMm2(double diameterMm) { return M_PI * (diameterMm / 2) * (diameterMm / 2); }

// Math.round: the nearest integer, ties toward +∞ (std::round rounds ties away from zero).
inline double jsRound(double x) {
  if (!std::isfinite(x)) return x;
  double r = std::floor(x);
  if (x - r >= 0.5) r += 1;
  return r == 0 && std::signbit(x) ? -0.0 : r;
}

// Math.max / Math.min of two numbers: NaN if either is NaN (std::max / std::min are not).
inline double jsMax(double a, double b) {
  if (std::isnan(a) || std::isnan(b)) return NAN;
  if (a == 0 && b == 0) return std::signbit(a) ? b : a;
  return a > b ? a : b;
}
inline double jsMin(double a, double b) {
  if (std::isnan(a) || std::isnan(b)) return NAN;
  if (a == 0 && b == 0) return std::signbit(a) ? a : b;
  return a < b ? a : b;
}

// Math.hypot of two numbers as V8 computes it (scaled by the larger magnitude, Kahan-summed
// squares), which is not glibc's hypot (the two differ in the last bit).
inline double jsHypot(double a, double b) {
  bool nan = false;
  double abs0 = 0, abs1 = 0, max = 0;
  if (std::isnan(a)) nan = true;
  else {
    abs0 = std::fabs(a);
    if (abs0 > max) max = abs0;
  }
  if (std::isnan(b)) nan = true;
  else {
    abs1 = std::fabs(b);
    if (abs1 > max) max = abs1;
  }
  if (max == INFINITY) return INFINITY;
  if (nan) return NAN;
  if (max == 0) return 0;
  double sum = 0, compensation = 0;
  double n = abs0 / max;
  double summand = n * n - compensation;
  double preliminary = sum + summand;
  compensation = (preliminary - sum) - summand;
  sum = preliminary;
  n = abs1 / max;
  summand = n * n - compensation;
  preliminary = sum + summand;
  compensation = (preliminary - sum) - summand;
  sum = preliminary;
  return std::sqrt(sum) * max;
}

// ECMAScript ToInt32 (what `x | 0` does): truncate, wrap modulo 2³², NaN and ±Infinity → 0.
inline int32_t jsToInt32(double x) {
  if (x > -2147483649.0 && x < 2147483648.0) return static_cast<int32_t>(x);
  if (!std::isfinite(x)) return 0;
  double m = std::fmod(std::trunc(x), 4294967296.0);
  if (m < 0) m += 4294967296.0;
  return static_cast<int32_t>(static_cast<uint32_t>(m));
}

// ECMAScript Number::toString(x) (ECMA-262 §6.1.6.1.20): what `${x}` prints in a message.
inline std::string jsNumber(double x) {
  if (std::isnan(x)) return "NaN";
  if (x == 0) return "0";
  if (std::isinf(x)) return x < 0 ? "-Infinity" : "Infinity";
  std::string out;
  if (x < 0) {
    out = "-";
    x = -x;
  }
  char buf[64];
  auto r = std::to_chars(buf, buf + sizeof buf, x, std::chars_format::scientific);
  std::string sci(buf, r.ptr);  // shortest round-trip digits: d[.ddd]e±XX
  size_t epos = sci.find('e');
  std::string digits;
  for (size_t i = 0; i < epos; i++)
    if (sci[i] != '.') digits += sci[i];
  int e10 = std::atoi(sci.c_str() + epos + 1);
  int k = (int)digits.size();
  int n = e10 + 1;  // value = 0.digits × 10^n
  if (k <= n && n <= 21) {
    out += digits + std::string(n - k, '0');
  } else if (0 < n && n <= 21) {
    out += digits.substr(0, n) + "." + digits.substr(n);
  } else if (-6 < n && n <= 0) {
    out += "0." + std::string(-n, '0') + digits;
  } else {
    out += digits.substr(0, 1);
    if (k > 1) out += "." + digits.substr(1);
    out += "e";
    out += (n - 1 >= 0 ? "+" : "-");
    out += std::to_string(std::abs(n - 1));
  }
  return out;
}

// ECMAScript Number.prototype.toFixed(f) for |x| < 1e21: ties round away from zero (the spec picks
// the larger n), where printf would round half to even.
inline std::string jsToFixed(double x, int f) {
  if (std::isnan(x)) return "NaN";
  if (std::fabs(x) >= 1e21) return jsNumber(x);
  bool neg = x < 0;
  double a = std::fabs(x);
  char buf[512];
  std::snprintf(buf, sizeof buf, "%.*f", f + 25, a);
  std::string exact(buf);
  size_t dot = exact.find('.');
  bool tie = exact[dot + f + 1] == '5';
  for (size_t i = dot + f + 2; tie && i < exact.size(); i++)
    if (exact[i] != '0') tie = false;
  std::string s;
  if (tie) {
    // Round the truncated digits up by one unit in the last place.
    std::string t = exact.substr(0, dot + (f > 0 ? f + 1 : 0));
    int i = (int)t.size() - 1;
    for (; i >= 0; i--) {
      if (t[i] == '.') continue;
      if (t[i] == '9') {
        t[i] = '0';
      } else {
        t[i]++;
        break;
      }
    }
    if (i < 0) t = "1" + t;
    s = t;
  } else {
    std::snprintf(buf, sizeof buf, "%.*f", f, a);
    s = buf;
  }
  return (neg ? "-" : "") + s;
}

// Minimal JSON writer for handing results to JavaScript. Numbers are written with the shortest
// digits that read back to the same double; non-finite numbers, which JSON cannot hold, are written
// as the strings "NaN", "Infinity", "-Infinity" and turned back into numbers by the JavaScript side.
class Json {
 public:
  std::string out;
  Json& beginObject() { sep(); out += '{'; first_.push_back(true); return *this; }
  Json& endObject() { out += '}'; first_.pop_back(); return *this; }
  Json& beginArray() { sep(); out += '['; first_.push_back(true); return *this; }
  Json& endArray() { out += ']'; first_.pop_back(); return *this; }
  // Object key; the next value call writes its value.
  Json& key(std::string_view k) {
    sep();
    quote(k);
    out += ':';
    afterKey_ = true;
    return *this;
  }
  Json& num(double v) {
    sep();
    if (std::isnan(v)) { out += "\"NaN\""; return *this; }
    if (std::isinf(v)) { out += v < 0 ? "\"-Infinity\"" : "\"Infinity\""; return *this; }
    if (v == 0) { out += std::signbit(v) ? "-0" : "0"; return *this; }
    char buf[64];
    auto r = std::to_chars(buf, buf + sizeof buf, v);
    out.append(buf, r.ptr);
    return *this;
  }
  Json& num(std::optional<double> v) { return v ? num(*v) : null(); }
  Json& integer(long long v) { sep(); out += std::to_string(v); return *this; }
  Json& boolean(bool v) { sep(); out += v ? "true" : "false"; return *this; }
  Json& null() { sep(); out += "null"; return *this; }
  Json& str(std::string_view s) { sep(); quote(s); return *this; }
  Json& strOrNull(const std::optional<std::string>& s) { return s ? str(std::string_view(*s)) : null(); }
  // A value already serialised as JSON.
  Json& raw(std::string_view j) { sep(); out += j; return *this; }

 private:
  std::vector<bool> first_;
  bool afterKey_ = false;
  void sep() {
    if (afterKey_) { afterKey_ = false; return; }
    if (first_.empty()) return;
    if (first_.back()) first_.back() = false;
    else out += ',';
  }
  void quote(std::string_view s) {
    out += '"';
    for (unsigned char c : s) {
      switch (c) {
        case '"': out += "\\\""; break;
        case '\\': out += "\\\\"; break;
        case '\n': out += "\\n"; break;
        case '\r': out += "\\r"; break;
        case '\t': out += "\\t"; break;
        default:
          if (c < 0x20) {
            char b[8];
            std::snprintf(b, sizeof b, "\\u%04x", c);
            out += b;
          } else {
            out += (char)c;
          }
      }
    }
    out += '"';
  }
};

}  // namespace hotlap
