// Mirrors lib/inspection/toolpath/layerTable.ts: compact per-layer storage for the toolpath-settings
// summary — every stored layer's volume (for the exact median) and one row of figures per layer
// that can enter a wall-count or infill estimate.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <vector>

namespace hotlap {

// The figures of one layer the summary reads (a subset of the analyzer's per-layer record).
struct LayerFigures {
  double z = 0;
  double h = 0;
  double volumeMm3 = 0;
  std::optional<double> walls;
  bool firstOfSequence = false;
  double innerLoops = 0;
  double sparseBlocks = 0;
  double solidBlocks = 0;
  double combinedLayers = 1;
  double sparseVolMm3 = 0;
  double sparseAreaMm2 = 0;
  double deepVolMm3 = 0;
  double deepAreaMm2 = 0;
};

// A stored layer with figures, as read back for the summary.
struct LayerRow : LayerFigures {
  // Position among the substantive layers (see mainRows).
  double mainIndex = 0;
};

// True when the layer can enter a summary filter (layerTable.ts layerHasFigures).
inline bool layerHasFigures(const LayerFigures& l) {
  if (l.firstOfSequence) return false;
  return (l.walls && *l.walls > 0) || (l.sparseBlocks >= 1 && l.deepAreaMm2 >= 16);
}

class LayerTable {
 public:
  LayerTable() {
    volumes_.reserve(4096);
    rows_.reserve(256);
  }
  // Layers stored.
  size_t layers() const { return volumes_.size(); }
  // Stores a layer's volume; returns its index.
  size_t addLayer(double volumeMm3) {
    volumes_.push_back(volumeMm3);
    return volumes_.size() - 1;
  }
  // Stores the figures of the layer at `index` (from addLayer; indices must ascend).
  void addFigures(size_t index, const LayerFigures& l);
  // Median volume of all stored layers (mean of the middle two for an even count); 0 when none.
  double medianVolume() const;
  // The substantive layers (volume ≥ minVolumeMm3): how many, and those with figures.
  size_t mainRows(double minVolumeMm3, std::vector<LayerRow>& rows) const;

 private:
  struct Row {
    double index;
    LayerFigures f;
  };
  std::vector<double> volumes_;
  std::vector<Row> rows_;
};

}  // namespace hotlap
