// Mirrors lib/inspection/toolpathSettings.ts: settings measured from the toolpaths alone (wall
// count, top and bottom solid layers, sparse infill density, layer height, line width, nozzle).
// Comments are never used for the figures. See the TypeScript file for the method; this class is
// its operation-for-operation twin (createToolpathSettingsAnalyzer with the default work budget).
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "columns.h"
#include "common.h"
#include "layer_grid.h"
#include "layer_table.h"

namespace hotlap {

// toolpathSettings.ts MeasuredFigure.
struct MeasuredFigure {
  std::optional<double> value;
  std::string detail;
};

// toolpathSettings.ts MeasuredSettings (result()).
struct MeasuredSettings {
  MeasuredFigure walls, top_layers, bottom_layers, infill_percent, layer_height_mm, first_layer_height_mm,
      line_width_mm, nozzle_mm;
  double layers = 0;
  double infill_every_layers = 1;
  double analysedLayers = 0;
  std::optional<double> labelledWallAgreement;
  std::vector<std::string> warnings;
};

// toolpathSettings.ts LayerRecord (the figures the table stores, plus the analyzer's extras).
struct LayerRecord : LayerFigures {
  double segments = 0;
  std::optional<double> infillToWallSection;
  std::optional<double> loopWidthMm;
  double sequence = 0;
};

class ToolpathSettingsAnalyzer : public MotionSink {
 public:
  explicit ToolpathSettingsAnalyzer(double filamentDiameterMm);
  void segment(const Segment& s) override;
  void comment(const char*, size_t, double) override {}
  void dwell(double, double) override {}
  void end() override;
  MeasuredSettings result() const;
  // Writes result() exactly as JSON.stringify(result()) does (non-finite numbers as strings).
  void toJson(Json& j) const;

 private:
  struct SequenceFirst {
    double z, volumeMm3, moves;
  };

  double areaOfFilamentMm2_;
  std::vector<std::string> warnings_;

  // Current layer buffer: x0 y0 x1 y1 A per segment (Float32Array), chain id per segment.
  std::vector<float> seg_;
  std::vector<int32_t> chainOf_;
  std::vector<float> segLen_;       // XY length of each buffered segment (Float32Array)
  std::vector<uint8_t> wallLabel_;
  double labelledWallMm_ = 0;
  double labelledWallInLoopsMm_ = 0;
  std::vector<int32_t> chainStart_;
  int nSeg_ = 0;
  int nChains_ = 0;
  double layerZ_ = NAN;
  double stVol_ = 0, stMinX_ = INFINITY, stMinY_ = INFINITY, stMaxX_ = -INFINITY, stMaxY_ = -INFINITY,
         stEndX_ = NAN, stEndY_ = NAN;
  bool layerTruncated_ = false;
  bool broken_ = true;

  double prevLayerZ_ = NAN;
  double prevMajorZ_ = NAN;
  double firstLayerThicknessMm_ = 0;
  double lastThicknessMm_ = 0.2;
  CountMap<double> zSteps_;
  std::vector<SequenceFirst> sequenceFirsts_;
  double sequence_ = 0;
  LayerTable table_;
  // The last stored records, for the combined-infill look-back (at most 9 layers down).
  std::vector<LayerRecord> recent_;
  LayerRecord standaloneRec_;
  LayerRecord* currentRec_ = nullptr;
  long long currentIndex_ = -1;
  double layerCount_ = 0;
  LayerGrid grid_;
  std::vector<double> blockBuf_;
  double widthScratch_[600];
  ColumnTracker columns_;
  double blockMm_ = 0;
  double cellBudgetBase_;
  double cellBudgetPerSegment_;
  double segmentsSeen_ = 0;
  double spentCells_ = 0;
  bool sampling_ = false;
  double windowLeft_ = 0;
  double skippedLayers_ = 0;
  double analysedLayers_ = 0;
  double absurdMoves_ = 0;
  bool skipStoring_ = false;
  double nSkippedSeg_ = 0;
  double lastLayerCells_ = 0;
  double refWidthMm_ = 0;
  // Width histogram of loop segments, 0.005 mm bins, length-weighted.
  double loopWidthHist_[600];
  // Extrusion spacing A ÷ h of outer-wall loops (band 1).
  double outerSpacingHist_[600];

  // Per-layer scratch (new typed arrays per layer in TypeScript).
  std::vector<uint8_t> isLoop_;
  std::vector<uint8_t> wallLoop_;
  double widthHistLayer_[600];
  double outerHistLayer_[600];
  std::vector<double> bandVotes_;
  std::vector<double> sortScratch_;

  void ensureCapacity();
  void newChain();
  void finishLayer();
  double layerThickness(double z, double moves);
  void noteHeights(double z, double moves, double volumeMm3, bool firstOfSequence);
  void decideStoring();
  double layerMedianWidth(double h);
  void analyseLayer(double z, double h, bool firstOfSequence);
  void summarise(MeasuredSettings& out) const;
};

}  // namespace hotlap
