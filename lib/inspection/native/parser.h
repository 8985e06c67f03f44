// C++ twin of lib/inspection/parser.ts (GcodeParser, featureFromLabel, featureFromVerboseComment):
// a small state machine over the bytes of one line at a time that resolves all modal state (units,
// distance modes, G92 offsets, arcs, firmware retraction, speed and flow factors) and hands one
// reused Segment per straight move to a MotionSink. Ported operation for operation; see parser.cc.
//
// How JavaScript drives it: exactly as reader.ts's LineSplitter drives the TypeScript parser (the
// LineSink calls): lines(buf, start, end) for a run of complete lines ending in an LF at end − 1,
// line(buf, start, end) for one line without its break, longLine(bytes) before a line that was cut
// at MAX_LINE_BYTES. Then end(), then toJson().
//
// Comments: where the TypeScript parser calls sink.comment(text, lineNo) with
// text = buf.toString('utf8', s, e), this parser calls sink.comment(ptr, len, lineNo) with that
// same byte range [s, e) (already trimmed of spaces, tabs and a trailing CR exactly as the
// TypeScript does). The JavaScript side must decode the bytes with Buffer#toString('utf8')
// (invalid sequences become U+FFFD, as in the TypeScript) and apply NO further step (no trim):
// the result is the TypeScript text exactly.
//
// Feature labels (";TYPE:" …) and Slic3r's verbose per-move comments are matched on a lowered copy
// of the bytes in a reused buffer. For ASCII text this is the TypeScript result by construction; for other
// bytes the matcher decodes UTF-8 as Buffer#toString does (WHATWG: maximal subparts → U+FFFD),
// lowers case as String#toLowerCase does for every character that matters (only U+212A KELVIN SIGN
// and U+0130 lower to something containing ASCII), trims as String#trim does (its non-ASCII
// white space included) and slices ";FEAT???E:" labels by UTF-16 units as String#slice does, so
// the result is the same for any bytes (tested on crafted non-ASCII labels and mutated fixtures).
//
// Differences from the TypeScript object that JavaScript can see, all without effect on results:
//   - Segment::tool is an int (common.h): after "T-0" the TypeScript segments carry tool −0, these
//     carry 0 (toolsUsed holds 0 in both: a JS Set stores −0 as +0).
//   - featureCache is not kept: featureFromLabel is a pure function, the cache only saved time.
//   - Json writes −0 as "-0" where JSON.stringify writes "0" (JSON.parse then gives the same −0
//     the TypeScript object holds, e.g. nozzleTempMaxC after "M104 S-0").
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "common.h"

// Marks the rarely taken paths (warnings) so the compiler keeps them out of the hot loop.
#if defined(__GNUC__)
#define HOTLAP_COLD __attribute__((cold, noinline))
#else
#define HOTLAP_COLD
#endif

// Small helpers of the per-word loop that must be inlined into it.
#if defined(__GNUC__)
#define HOTLAP_INLINE inline __attribute__((always_inline))
#else
#define HOTLAP_INLINE inline
#endif

namespace hotlap {

// parser.ts ParserOptions, with the defaults GcodeParser's constructor applies.
struct ParserOptions {
  // Verify `*nn` checksums (RepRap wiki "Checking"); a mismatch is a warning.
  bool verifyChecksums = true;
  // Firmware retraction length for G10 when the file sets none with M207 (mm).
  double firmwareRetractMm = 3;
  // Firmware retraction feed (mm/s).
  double firmwareRetractFeedMms = 45;
  // Longest chord error allowed when splitting arcs into lines, mm.
  double arcToleranceMm = 0.01;
  // Cap on stored warnings (the rest are only counted). A double as in JavaScript.
  double maxWarnings = 50;
  // C++ only: false for a sink whose comment() ignores its input (the TypeScript parser checks
  // `typeof sink.comment === 'function'`); it then skips comment work whose result is unused.
  bool wantsComments = true;
};

struct ParserWarning {
  std::string code;
  double lineNo = 0;
  std::string message;  // UTF-8 (bytes quoted from the file are latin1-decoded, as in TypeScript)
};

// parser.ts OverrideEvent.
struct OverrideEvent {
  double percent = 0;
  double lineNo = 0;
};

struct OverrideStats {
  std::optional<OverrideEvent> max, min;
  double count = 0;
};

// parser.ts ParserStats. Counts are doubles, as the JavaScript numbers they mirror.
struct ParserStats {
  double lines = 0;
  double commands = 0;
  double moves = 0;
  double arcs = 0;
  // Map<string, number> in insertion order (at most 64 names).
  std::vector<std::pair<std::string, double>> unknownCommands;
  double unknownCommandCount = 0;
  double checksumErrors = 0;
  double longLines = 0;
  double warningsTotal = 0;
  OverrideStats speedFactor;
  OverrideStats flowFactor;
  std::optional<double> nozzleTempMaxC, bedTempMaxC, fanMaxPercent;
  // Set<number> in insertion order.
  std::vector<double> toolsUsed{0};
  double firmwareRetractions = 0;
  double featureLabels = 0;
  double textCommands = 0;
};

class Parser {
 public:
  Parser(MotionSink& sink, const ParserOptions& options, MachineState& machine);

  // As GcodeParser.lines(): the complete lines of [start, end), end − 1 being an LF; returns how
  // many there were. Reads nothing outside [start, end) even if end − 1 is not an LF.
  double lines(const uint8_t* buf, size_t start, size_t end);
  // As GcodeParser.line(): one line [start, end) without its line break.
  void line(const uint8_t* buf, size_t start, size_t end);
  // As GcodeParser.longLine(): the next line handed to line() was `bytes` long and has been cut.
  void longLine(double bytes);
  // As GcodeParser.end(): flushes the sink.
  void end();
  // {"stats":…, "warnings":[…], "machine":{…}}: the TypeScript parser's stats, warnings and machine
  // (unknownCommands as [[name, count], …], toolsUsed and machine.setBy as arrays).
  void toJson(Json& j) const;

  const ParserStats& stats() const { return stats_; }
  const std::vector<ParserWarning>& warnings() const { return warnings_; }
  // GcodeParser.currentFeature / featureLabelsSeen.
  int currentFeature() const { return feature_; }
  bool featureLabelsSeen() const { return labelsSeen_; }

 private:
  static constexpr int kMaxTools = engine::MAX_TOOLS;

  MotionSink& sink_;
  MachineState& machine_;
  ParserStats stats_;
  std::vector<ParserWarning> warnings_;
  bool wantsComments_;
  bool verifyChecksums_;
  double arcTolMm_;
  double maxWarnings_;

  Segment seg_;

  // Physical position, and G92 offsets: logical = physical − offset.
  double px_ = 0, py_ = 0, pz_ = 0;
  double ox_ = 0, oy_ = 0, oz_ = 0;
  double eLogical_ = 0;  // logical E position (mm of filament)
  double unitMm_ = 1;
  bool axisRelative_ = false;
  bool eModeRelative_ = false;
  double plane_ = 17;
  double motionMode_ = -1;  // modal motion code (0..3); −1 before the first motion
  double feedMmMin_ = 1800;
  double speedFactor_ = 1;
  double savedSpeedFactor_ = 1;
  double flowFactor_[kMaxTools];
  double tool_ = 0;
  int feature_ = kFeatureNone;
  bool labelsSeen_ = false;

  // Firmware retraction (Marlin FWRETRACT: M207/M208/G10/G11).
  double fwRetractMm_;
  double fwRetractFeedMms_;
  double fwRecoverExtraMm_ = 0;
  double fwRecoverFeedMms_;
  bool fwRetracted_ = false;

  // Per-line word state.
  double lineNo_ = 0;
  uint32_t mask_ = 0;
  double vals_[26] = {};
  double gCodes_[8] = {};
  int nG_ = 0;
  double mCodes_[8] = {};
  int nM_ = 0;
  bool toolWordFirst_ = false;
  bool firstWord_ = true;
  // trailingComment !== null, and featureFromVerboseComment(trailingComment) (kFeatureNone = null).
  bool trailingComment_ = false;
  int trailingFeature_ = kFeatureNone;

  double numVal_ = 0;  // value of the number readNumber() just scanned

  // Target of the next straight move, read by emit().
  double tx_ = 0, ty_ = 0, tz_ = 0, tde_ = 0;

  std::string scratch_;  // reused for text command names and number text

  size_t lineImpl(const uint8_t* buf, size_t start, size_t end);
  bool warnSlot();
  HOTLAP_COLD void warn(const char* code, std::string message);
  HOTLAP_COLD void noCommand();
  HOTLAP_COLD void noteLongLine(double bytes, double lineNo, size_t at);
  void beginStatement();
  void storeWord(int letter, double v);
  size_t readNumber(const uint8_t* buf, size_t i, size_t end);
  size_t readNumberTs(const uint8_t* buf, size_t i, size_t end, bool neg);
  size_t readLongNumber(const uint8_t* buf, size_t i, size_t end, bool neg, ptrdiff_t dotAt, double mant);
  size_t readExponent(const uint8_t* buf, size_t i, size_t end);
  size_t checksum(const uint8_t* buf, size_t stmtStart, size_t star, size_t end);
  void handleComment(const uint8_t* buf, size_t s, size_t e);
  size_t textCommand(const uint8_t* buf, size_t i, size_t end);
  void setVelocityLimit(const uint8_t* buf, size_t s, size_t e);
  bool sane(const char* what, double v, double min, double max);
  void countUnknown(const std::string& name);
  bool has(int letter) const { return (mask_ & (1u << letter)) != 0; }
  double num(int letter);
  void execute();
  void gCode(double g);
  void mCode(double m);
  void toolChange(double t);
  void setSpeedFactor();
  void setFlowFactor();
  double limit(const char* cmd, int letter, double min, double max);
  HOTLAP_COLD void badLimit(const char* cmd, int letter, double v, double min, double max);
  HOTLAP_COLD void noNumber(int letter);
  void m204();
  void m205();
  void m201();
  void m203();
  void setPosition();
  void home();
  void dwell();
  void firmwareRetract();
  void firmwareRecover();
  void emitStationaryE(double eMm, double feedMms);
  bool coordOk(int letter, double maxAbs);
  HOTLAP_COLD void badFeed();
  HOTLAP_COLD void badCoord(int letter, double maxAbs);
  void motion(double mode);
  void linear(double tx, double ty, double tz, double de);
  void emit();
  void arc(bool cw, double tx, double ty, double tz, double de);
};

// featureFromLabel() of the text a ";TYPE:" label decodes to, given as UTF-8 bytes; a feature index
// or kFeatureNone (null).
int featureFromLabel(const uint8_t* label, size_t len);

// ECMAScript Number(string) of a latin1 string (each byte one character); NaN when not a number.
double jsStringToNumber(const uint8_t* p, size_t n);

// Math.pow(10, n) exactly as V8 computes it (its pow differs from glibc's by one ulp for some n).
double jsPow10(double n);

}  // namespace hotlap
