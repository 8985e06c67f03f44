// Mirrors lib/inspection/toolpath/layerTable.ts (LayerTable). Rows are kept as float64 figures, as
// the TypeScript Float64Array rows are (walls: NaN there = nullopt here).
#include "layer_table.h"

#include <algorithm>
#include <cmath>

namespace hotlap {

void LayerTable::addFigures(size_t index, const LayerFigures& l) {
  Row r;
  r.index = (double)index;
  r.f = l;
  r.f.firstOfSequence = false;  // not stored: read back as false
  rows_.push_back(r);
}

double LayerTable::medianVolume() const {
  const size_t n = volumes_.size();
  if (n == 0) return 0;
  std::vector<double> s(volumes_);
  // Float64Array.prototype.sort(): numeric, −0 before +0, NaN last.
  std::sort(s.begin(), s.end(), [](double a, double b) {
    if (std::isnan(a)) return false;
    if (std::isnan(b)) return true;
    if (a < b) return true;
    if (a > b) return false;
    return std::signbit(a) && !std::signbit(b);
  });
  const size_t m = n >> 1;
  return n % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

size_t LayerTable::mainRows(double minVolumeMm3, std::vector<LayerRow>& rows) const {
  rows.clear();
  size_t mainIndex = 0;
  size_t next = 0;
  const size_t nRows = rows_.size();
  for (size_t i = 0; i < volumes_.size(); i++) {
    const double vol = volumes_[i];
    if (!(vol >= minVolumeMm3)) continue;
    while (next < nRows && rows_[next].index < (double)i) next++;
    if (next < nRows && rows_[next].index == (double)i) {
      LayerRow row;
      static_cast<LayerFigures&>(row) = rows_[next].f;
      row.mainIndex = (double)mainIndex;
      row.volumeMm3 = vol;
      row.firstOfSequence = false;
      rows.push_back(row);
    }
    mainIndex++;
  }
  return mainIndex;
}

}  // namespace hotlap
