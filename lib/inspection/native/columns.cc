// Mirrors lib/inspection/toolpath/columns.ts (ColumnTracker).
#include "columns.h"
#include "engine_constants.h"

namespace hotlap {

namespace {
constexpr int FROM_AIR = 1;
constexpr int FROM_SPARSE = 2;
constexpr int FROM_OTHER = 3;
// engineConstants.ts MAX_INFILL_GAP, MAX_COLUMNS.
constexpr long long kMaxInfillGap = engine::MAX_INFILL_GAP;
constexpr size_t kMaxColumns = engine::MAX_COLUMNS;
}  // namespace

void ColumnTracker::set(long long key, int state) {
  auto it = index_.find(key);
  Column* c;
  if (it == index_.end()) {
    if (state == kBEmpty) return;
    if (cols_.size() >= kMaxColumns) {
      overflowed = true;
      return;
    }
    index_.emplace(key, (uint32_t)cols_.size());
    cols_.push_back(Column{key, kBEmpty, layer_ - 1, 0, FROM_OTHER, 0});
    c = &cols_.back();
  } else {
    c = &cols_[it->second];
  }
  const long long gap = layer_ - c->lastLayer - 1;
  if (state == kBEmpty) return;
  if (gap == 0) step(*c, c->state, state);
  else afterGap(*c, gap, state);
  c->state = state;
  c->lastLayer = layer_;
}

void ColumnTracker::endLayer() {
  for (size_t i = 0; i < cols_.size();) {
    Column& c = cols_[i];
    if (c.lastLayer == layer_) {
      i++;
      continue;
    }
    if (c.lastLayer == layer_ - 1) {
      toEmpty(c);
      i++;
    } else if (layer_ - c.lastLayer > kMaxInfillGap + 1) {
      erase(i);  // the last column moves into slot i, visited next
    } else {
      i++;
    }
  }
}

void ColumnTracker::finish() {
  for (Column& c : cols_)
    if (c.lastLayer == layer_) toEmpty(c);
  clear();
}

void ColumnTracker::abandon() {
  layer_++;
  clear();
}

void ColumnTracker::clear() {
  if (!cols_.empty()) {
    cols_.clear();
    index_.clear();
  }
}

void ColumnTracker::erase(size_t i) {
  index_.erase(cols_[i].key);
  if (i + 1 != cols_.size()) {
    cols_[i] = cols_.back();
    index_[cols_[i].key] = (uint32_t)i;
  }
  cols_.pop_back();
}

void ColumnTracker::step(Column& c, int prev, int next) {
  if (next == kBSolid) {
    if (prev == kBSolid) c.run++;
    else {
      c.run = 1;
      c.from = prev == kBSparse ? FROM_SPARSE : prev == kBEmpty ? FROM_AIR : FROM_OTHER;
    }
    return;
  }
  if (prev == kBSolid && next == kBSparse && c.from == FROM_AIR) bottomRuns.add(c.run);
  c.run = 0;
}

void ColumnTracker::toEmpty(Column& c) {
  if (c.state == kBSolid) {
    if (c.from == FROM_SPARSE) topRuns.add(c.run);
    c.pendingBottom = c.from == FROM_AIR ? c.run : 0;
  } else c.pendingBottom = 0;
  c.run = 0;
}

void ColumnTracker::afterGap(Column& c, long long gap, int next) {
  const bool shortGap = gap <= kMaxInfillGap;
  if (next == kBSparse) {
    // Bottom solid layers, a combined-infill gap, then the thick infill layer.
    if (shortGap && c.pendingBottom > 0) bottomRuns.add(c.pendingBottom);
    c.run = 0;
  } else if (next == kBSolid) {
    c.run = 1;
    c.from = shortGap && c.state == kBSparse ? FROM_SPARSE : FROM_AIR;
  } else c.run = 0;
  c.pendingBottom = 0;
}

}  // namespace hotlap
