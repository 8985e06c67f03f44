// Mirrors lib/inspection/toolpath/layerGrid.ts: one layer's extrusion rasterised on a square grid,
// reused from layer to layer so memory stays at one grid (capped at kMaxGridCells).
//
// Cell labels after classify():
//   kPaintLoop / kPaintOther — covered by an extrusion that is part of a closed loop / anything else,
//   kOutside — empty and connected to the grid border,
//   kHole — empty, enclosed, wide and bounded almost only by one loop (a hole through the part),
//   kGap — empty but enclosed otherwise: the space between sparse-infill lines, inside the part.
// The part's filled region F is every cell that is neither kOutside nor kHole.
#pragma once

#include <cmath>
#include <cstdint>
#include <vector>

#include "common.h"

namespace hotlap {

constexpr uint8_t kCellEmpty = 0;
constexpr uint8_t kPaintLoop = 1;
constexpr uint8_t kPaintOther = 2;
constexpr uint8_t kOutside = 3;
constexpr uint8_t kHole = 4;
constexpr uint8_t kGap = 5;

// Upper bound on grid cells (engineConstants.ts MAX_GRID_CELLS).
constexpr int kMaxGridCells = engine::MAX_GRID_CELLS;


class LayerGrid {
 public:
  int nx = 0;
  int ny = 0;
  double originX = 0;
  double originY = 0;
  double cellMm = 1;
  std::vector<uint8_t> label;   // Uint8Array
  // Extruded volume dropped in each cell (mm³), sampled along each segment (Float32Array).
  std::vector<float> volume;
  // Chamfer distance to the nearest cell outside F, in units of cellMm / 3 (Uint16Array).
  std::vector<uint16_t> dist;
  // Loop number + 1 of the closed loop painted last over each cell (0: none) (Int32Array).
  std::vector<int32_t> loopId;
  // Set by loopsCrossed().
  double lastGapMm = 0;

  void reset(double originX, double originY, double cellMm, int nx, int ny);
  // Paint a capsule of radius rMm around the segment and drop its volume along it; loopNo ≥ 0
  // marks a closed loop's number.
  void paint(double x0, double y0, double x1, double y1, double rMm, double volumeMm3, int loopNo);
  // Label empty cells kOutside / kHole / kGap (see layerGrid.ts classify).
  void classify(double holeMinThicknessMm);
  // Chamfer distance (3-4) from every cell to the nearest cell outside F.
  void distanceTransform();
  // Per block of k × k cells: cells in F, cells deeper than deepUnits, volume in those deep cells.
  void blockStats(int k, double deepUnits, double* out) const;
  // Distance (mm) from the point to the outside of F, read from its cell; −1 off-grid.
  double depthAtMm(double x, double y) const;
  // Walk from (x, y) along (dx, dy) until leaving F; distinct loops crossed other than selfLoop,
  // −1 when F is not left within maxMm or more than maxCount loops are crossed.
  int loopsCrossed(double x, double y, double dx, double dy, int selfLoop, double maxMm, int32_t* seen,
                   int seenLength, int maxCount = 1 << 30);

 private:
  std::vector<int32_t> queue_;
  // paint(): per-column scratch of one piece (cell centre x and (cx − ax)·ex).
  std::vector<double> colBuf_;
};

}  // namespace hotlap
