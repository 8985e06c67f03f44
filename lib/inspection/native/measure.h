// C++ twin of lib/inspection/measure.ts: measurements over the parsed move stream: filament,
// volumetric flow, layers, line widths, geometry (bounding box, separate objects), commanded speeds
// per feature, and the planned print time (through MotionPlanner). Everything is accumulated in
// fixed-size structures, so memory does not grow with the file (layer records grow with the layer
// count only, capped).
#pragma once

#include <cstdint>
#include <cstdlib>
#include <memory>
#include <unordered_map>
#include <vector>

#include "common.h"
#include "planner.h"

namespace hotlap {

// lineWidthMm: line width from an extrusion cross-section A at layer height h, modelling the bead as
// a rectangle with semicircular ends (Slic3r's flow math: A = (w − h)·h + π(h/2)²), solved for w:
// w = (A − π h²/4) ÷ h + h.
inline double lineWidthMm(double crossSectionMm2, double layerHeightMm) {
  const double h = layerHeightMm;
  return (crossSectionMm2 - (M_PI * h * h) / 4) / h + h;
}

// crossSectionMm2: inverse of lineWidthMm: A = (w − h)·h + π(h/2)² (same Slic3r flow model).
inline double crossSectionMm2(double lineWidthMm, double layerHeightMm) {
  const double h = layerHeightMm;
  return (lineWidthMm - h) * h + M_PI * (h / 2) * (h / 2);
}

// Bins, grid and caps (engineConstants.ts).
constexpr double kFlowBinMm3s = engine::FLOW_BIN_MM3S;
constexpr int kFlowBins = engine::FLOW_BINS;
constexpr int kTimeSeriesPoints = engine::TIME_SERIES_POINTS;
constexpr double kGridCellMm = engine::GRID_CELL_MM;
constexpr int kGridN = engine::GRID_N;
constexpr double kGridOriginMm = engine::GRID_ORIGIN_MM;
constexpr int kMaxLayers = engine::MEASURE_MAX_LAYERS;
// Layer index used for moves on layers beyond kMaxLayers (their time and count are kept in totals).
constexpr int kOverflowLayer = kMaxLayers;
constexpr double kWidthBinMm = engine::WIDTH_BIN_MM;
constexpr int kWidthBins = engine::WIDTH_BINS;
constexpr double kZKeyPerMm = engine::Z_KEY_PER_MM;
// Index kFeatureCount is "unlabelled".
constexpr int kNFeatures = kFeatureCount + 1;

class Measurements final : public MotionSink {
 public:
  // machine may be nullptr (TS: MachineState | null). The JS side merges {...DEFAULT_LIMITS, ...options.limits}.
  Measurements(double filamentDiameterMm, const MachineLimits& limits, const MachineState* machine);
  void segment(const Segment& s) override;
  void comment(const char*, size_t, double) override {}  // the TS Measurements takes no comments
  void dwell(double timeS, double lineNo) override;      // TS dwell(timeS)
  void end() override;
  // Writes result() as JSON.stringify(measure.result()) would (non-finite numbers as strings).
  void toJson(Json& j) const;

  // PlannedMoveSink: called by the planner when a move's duration is final.
  void planned(double timeS, double flowMm3s, int32_t layerIndex);

  MotionPlanner<Measurements> planner;

 private:
  double areaMm2_;

  double netE_ = 0;
  // Net filament fed before the first labelled extruding move / before records 0 and 1 began.
  double eBeforeLabelled_ = NAN;
  double eBeforeRecord_[2] = {NAN, NAN};
  double posE_ = 0;
  double negE_ = 0;
  double retractions_ = 0;
  double extrudingMoves_ = 0;
  double travelMoves_ = 0;
  double extrLen_ = 0;
  double travelLen_ = 0;
  double commandedS_ = 0;

  // Flow.
  std::vector<double> hist_;  // kFlowBins + 1
  double peakFlow_ = -1;
  double peakLine_ = 0;
  double extrudeTimeS_ = 0;
  double extrudeVolMm3_ = 0;
  double tsBucketS_ = 1;
  double tsN_ = 0;
  double tsMax_[kTimeSeriesPoints] = {};
  double tsVol_[kTimeSeriesPoints] = {};
  double plannedT_ = 0;
  // Bucket of the current time and the time it ends (s); −Infinity end until the first move.
  double tsCur_ = 0;
  double tsCurEndS_ = -INFINITY;

  // Layers: records in order of first appearance.
  std::unordered_map<uint64_t, int32_t> layerIdByKey_;
  std::vector<double> layerZ_, layerH_, layerTime_, layerVol_;
  double curKey_ = NAN;
  int32_t curLayer_ = -1;
  double maxLayerZ_ = 0;
  double beforeFirstS_ = 0;
  // Layers beyond kMaxLayers: counted (new highest Z) but not listed; their planned time.
  double overflowLayers_ = 0;
  double overflowS_ = 0;
  // Index of the layer record that is the first of the stack (0, or 1 when record 0 was a prime line above it).
  int32_t stackStart_ = 0;
  bool preambleDecided_ = false;

  // Features.
  double fLen_[kNFeatures] = {};
  double fVol_[kNFeatures] = {};
  double fTime_[kNFeatures] = {};
  double fWidthLen_[kNFeatures] = {};
  double fWidthSum_[kNFeatures] = {};
  double fWMin_[kNFeatures];
  double fWMax_[kNFeatures];
  double fVMin_[kNFeatures];
  double fVMax_[kNFeatures];
  double labelledMoves_ = 0;
  // Extruding length of moves that change Z (spiral / vase mode, non-planar paths).
  double nonPlanarLen_ = 0;
  // Length-weighted histogram of line widths (skirt left out), for a robust typical width.
  double widthHist_[kWidthBins] = {};
  double widthHistSum_[kWidthBins] = {};

  // Geometry (boxes: minX minY minZ maxX maxY maxZ).
  double boxLabelled_[6];  // labelled, not skirt/support
  double boxFirst_[6];     // stack first layer, all
  double boxLater_[6];     // later layers, all but skirt/support labels
  double boxPre_[6];       // provisional record-0 box
  double boxAll_[6];
  // kGridN² cells (4 MB), allocated and zero-filled on the first marked move (malloc + memset:
  // measured faster than calloc when one process inspects file after file, as the heap is reused).
  struct FreeDeleter {
    void operator()(uint8_t* p) const { std::free(p); }
  };
  std::unique_ptr<uint8_t[], FreeDeleter> grid_;

  // Per-move figures for extrusion().
  double moveE_ = 0;
  double moveVolMm3_ = 0;
  double moveDtS_ = 0;

  void mergeBuckets();
  void extrusion(const Segment& s);
  void enterLayer(double key, double z);
  void mark(const Segment& s, uint8_t bit);
  double countObjects(uint8_t bits, int gMinI, int gMinJ, int gMaxI, int gMaxJ) const;
  std::optional<double> medianWidthMm() const;
};

}  // namespace hotlap
