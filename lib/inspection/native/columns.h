// Mirrors lib/inspection/toolpath/columns.ts: vertical columns of fixed XY blocks, followed layer
// by layer, to count solid layers over every bottom surface (bed or overhang) and under every top
// surface.
//
// A block's state per layer: kBEmpty (outside the part), kBSolid or kBSparse (fully inside the
// infill region, by its volume fraction), or kBEdge (partly walls, partly outside — says nothing).
//  - A run of SOLID that starts over EMPTY (bed, air) and ends at SPARSE is a bottom-layer count.
//  - A run of SOLID that starts over SPARSE and ends at EMPTY (nothing above) is a top-layer count.
//  - Runs touching EDGE, or solid all the way through (a thin plate), prove nothing and are dropped.
// A short EMPTY gap (≤ kMaxInfillGap layers) between SPARSE and SOLID is read as combined infill.
#pragma once

#include <cstddef>
#include <cstdint>
#include <unordered_map>
#include <utility>
#include <vector>

namespace hotlap {

constexpr int kBEmpty = 0;
constexpr int kBSolid = 1;
constexpr int kBSparse = 2;
constexpr int kBEdge = 3;

// Insertion-ordered Map<number, number> of counts (bottomRuns / topRuns / zSteps style).
template <typename K>
class CountMap {
 public:
  std::vector<std::pair<K, long long>> entries;  // insertion order
  void add(K key, long long by = 1) {
    auto it = index_.find(key);
    if (it == index_.end()) {
      index_.emplace(key, entries.size());
      entries.emplace_back(key, by);
    } else {
      entries[it->second].second += by;
    }
  }
  size_t size() const { return entries.size(); }
  void clear() {
    entries.clear();
    index_.clear();
  }

 private:
  std::unordered_map<K, size_t> index_;
};

class ColumnTracker {
 public:
  CountMap<long long> bottomRuns;
  CountMap<long long> topRuns;
  bool overflowed = false;

  static long long key(long long bx, long long by) { return (bx + 1048576) * 2097152 + (by + 1048576); }

  // Start a new layer; blocks not set during the layer count as EMPTY.
  void beginLayer() { layer_++; }
  void set(long long key, int state);
  // Close the layer: columns with material last layer and none now went EMPTY.
  void endLayer();
  // End of a sequence of layers (end of file, or Z went back down): everything above is air.
  void finish();
  // A layer was not analysed: runs in progress cannot be counted; forget them.
  void abandon();

 private:
  struct Column {
    long long key;
    // State on layer lastLayer (the last layer the block was not EMPTY).
    int state;
    long long lastLayer;
    long long run;
    int from;
    // A bottom run (from the bed or air) that ended at an empty gap, waiting to see sparse infill.
    long long pendingBottom;
  };
  // The Map<number, Column> of columns.ts: dense storage plus an index (iteration order does not
  // change any count: the run maps are read through a mode that breaks ties by value).
  std::vector<Column> cols_;
  std::unordered_map<long long, uint32_t> index_;
  long long layer_ = -1;

  void clear();
  void erase(size_t i);
  void step(Column& c, int prev, int next);
  void toEmpty(Column& c);
  void afterGap(Column& c, long long gap, int next);
};

}  // namespace hotlap
