// C++ twin of lib/inspection/measure.ts (class Measurements and its helpers), operation for operation.
#include "measure.h"

#include <algorithm>
#include <new>

namespace hotlap {

namespace {

// Grid cell bits.
constexpr uint8_t kCellPreamble = 1;
constexpr uint8_t kCellFirst = 2;
constexpr uint8_t kCellLater = 4;

// Map<number, …> key: SameValueZero (−0 is +0, NaN is one key).
inline uint64_t keyBits(double k) {
  if (k == 0) return 0;
  if (std::isnan(k)) return 0x7ff8000000000000ULL;
  uint64_t u;
  std::memcpy(&u, &k, sizeof u);
  return u;
}

void emptyBox(double* b) {
  b[0] = b[1] = b[2] = INFINITY;
  b[3] = b[4] = b[5] = -INFINITY;
}

// growBox(b, s). The segment's extent (xa…zb) is the same for every box a move grows, so it is
// computed once per move (SegExtent) and applied to each box (same comparisons, same values).
struct SegExtent {
  double xa, ya, za, xb, yb, zb;
  explicit SegExtent(const Segment& s)
      : xa(s.x0 < s.x1 ? s.x0 : s.x1),
        ya(s.y0 < s.y1 ? s.y0 : s.y1),
        za(s.z0 < s.z1 ? s.z0 : s.z1),
        xb(s.x0 < s.x1 ? s.x1 : s.x0),
        yb(s.y0 < s.y1 ? s.y1 : s.y0),
        zb(s.z0 < s.z1 ? s.z1 : s.z0) {}
};

inline void growBox(double* b, const SegExtent& e) {
  if (e.xa < b[0]) b[0] = e.xa;
  if (e.ya < b[1]) b[1] = e.ya;
  if (e.za < b[2]) b[2] = e.za;
  if (e.xb > b[3]) b[3] = e.xb;
  if (e.yb > b[4]) b[4] = e.yb;
  if (e.zb > b[5]) b[5] = e.zb;
}

// boxOrNull: false when the box is empty.
inline bool boxValid(const double* b) { return b[0] <= b[3]; }

void mergeBox(double* into, const double* from) {
  for (int i = 0; i < 3; i++)
    if (from[i] < into[i]) into[i] = from[i];
  for (int i = 3; i < 6; i++)
    if (from[i] > into[i]) into[i] = from[i];
}

void writeBox(Json& j, const double* b) {
  j.beginObject();
  j.key("minX").num(b[0]);
  j.key("minY").num(b[1]);
  j.key("minZ").num(b[2]);
  j.key("maxX").num(b[3]);
  j.key("maxY").num(b[4]);
  j.key("maxZ").num(b[5]);
  j.endObject();
}

// Array.prototype.sort with (a, b) => a − b: a stable merge sort that puts b before a only when
// a − b > 0 (well defined for any input; identical to V8's result whenever no NaN is present).
void sortNumbers(std::vector<double>& v) {
  const size_t n = v.size();
  std::vector<double> tmp(n);
  for (size_t width = 1; width < n; width *= 2) {
    for (size_t lo = 0; lo < n; lo += 2 * width) {
      const size_t mid = std::min(lo + width, n);
      const size_t hi = std::min(lo + 2 * width, n);
      size_t i = lo, k = mid, o = lo;
      while (i < mid && k < hi) {
        if (v[i] - v[k] > 0) tmp[o++] = v[k++];
        else tmp[o++] = v[i++];
      }
      while (i < mid) tmp[o++] = v[i++];
      while (k < hi) tmp[o++] = v[k++];
    }
    v.swap(tmp);
  }
}

}  // namespace

Measurements::Measurements(double filamentDiameterMm, const MachineLimits& limits, const MachineState* machine)
    : planner(this, machine, limits), areaMm2_(filamentAreaMm2(filamentDiameterMm)), hist_(kFlowBins + 1, 0.0) {
  for (int i = 0; i < kNFeatures; i++) {
    fWMin_[i] = INFINITY;
    fWMax_[i] = -INFINITY;
    fVMin_[i] = INFINITY;
    fVMax_[i] = -INFINITY;
  }
  emptyBox(boxLabelled_);
  emptyBox(boxFirst_);
  emptyBox(boxLater_);
  emptyBox(boxPre_);
  emptyBox(boxAll_);
  layerIdByKey_.reserve(2 * kMaxLayers);
  layerZ_.reserve(1024);
  layerH_.reserve(1024);
  layerTime_.reserve(1024);
  layerVol_.reserve(1024);
}

void Measurements::segment(const Segment& s) {
  const double e = s.eMm;
  moveE_ = e;
  netE_ += e;
  const double L = s.lengthMm;
  const double feed = s.feedMms;
  const double dt = L > 0 ? L / feed : e != 0 ? (e < 0 ? -e : e) / feed : 0;
  commandedS_ += dt;
  if (e > 0) {
    posE_ += e;
  } else if (e < 0) {
    negE_ -= e;
    retractions_++;
  }
  double flow = 0;
  if (s.extruding) {
    if (s.feature != kFeatureNone && eBeforeLabelled_ != eBeforeLabelled_) eBeforeLabelled_ = netE_ - e;
    extrudingMoves_++;
    extrLen_ += L;
    const double vol = e * areaMm2_;
    flow = vol / dt;
    extrudeTimeS_ += dt;
    extrudeVolMm3_ += vol;
    if (flow > peakFlow_) {
      peakFlow_ = flow;
      peakLine_ = s.lineNo;
    }
    int32_t bin = jsToInt32(flow / kFlowBinMm3s);
    if (bin > kFlowBins || bin < 0) bin = kFlowBins;
    hist_[bin] += dt;
    moveVolMm3_ = vol;
    moveDtS_ = dt;
    extrusion(s);
  } else if (L > 0) {
    travelMoves_++;
    travelLen_ += L;
  }
  planner.nextFlowMm3s = flow;
  planner.push(s, curLayer_);
}

void Measurements::dwell(double timeS, double /*lineNo*/) { planner.dwell(timeS, curLayer_); }

void Measurements::end() { planner.flush(); }

void Measurements::planned(double timeS, double flowMm3s, int32_t layerIndex) {
  if (layerIndex == kOverflowLayer) overflowS_ += timeS;
  else if (layerIndex >= 0) layerTime_[layerIndex] += timeS;
  else beforeFirstS_ += timeS;
  // Time series bucket at the move's start time; double the bucket length when the series is full.
  // The bucket index only changes when the time passes the current bucket's end, so the division
  // is skipped for most moves (bucket lengths are powers of two: the index and end are exact).
  double b = tsCur_;
  if (!(plannedT_ < tsCurEndS_)) {
    b = std::floor(plannedT_ / tsBucketS_);
    while (b >= kTimeSeriesPoints) {
      mergeBuckets();
      b = std::floor(plannedT_ / tsBucketS_);
    }
    tsCur_ = b;
    tsCurEndS_ = (b + 1) * tsBucketS_;
  }
  if (b >= tsN_) tsN_ = b + 1;
  // A typed-array index outside 0…599 (negative or NaN time) reads undefined and writes nothing.
  if (b >= 0 && b < kTimeSeriesPoints) {
    const int bi = static_cast<int>(b);
    if (flowMm3s > tsMax_[bi]) tsMax_[bi] = flowMm3s;
    tsVol_[bi] += flowMm3s * timeS;
  }
  plannedT_ += timeS;
}

void Measurements::mergeBuckets() {
  const int half = kTimeSeriesPoints / 2;
  for (int i = 0; i < half; i++) {
    const int a = 2 * i;
    tsMax_[i] = jsMax(tsMax_[a], tsMax_[a + 1]);
    tsVol_[i] = tsVol_[a] + tsVol_[a + 1];
  }
  for (int i = half; i < kTimeSeriesPoints; i++) {
    tsMax_[i] = 0;
    tsVol_[i] = 0;
  }
  tsBucketS_ *= 2;
  tsN_ = std::ceil(tsN_ / 2);
  tsCurEndS_ = -INFINITY;
}

void Measurements::extrusion(const Segment& s) {
  const double vol = moveVolMm3_;
  const double dt = moveDtS_;
  const double L = s.lengthMm;
  // Layer bookkeeping from planar extruding moves (works without any layer comments).
  const bool planar = s.z0 == s.z1;
  if (!planar) nonPlanarLen_ += L;
  if (planar) {
    const double key = jsRound(s.z1 * kZKeyPerMm);
    if (key != curKey_) enterLayer(key, s.z1);
  }
  const int32_t li = curLayer_;
  if (li >= 0 && li != kOverflowLayer) layerVol_[li] += vol;
  const int f = s.feature;
  // featureIndex(); a feature outside FEATURE_KINDS would index nothing in TypeScript (undefined).
  const bool known = f >= kFeatureNone && f < kFeatureCount;
  const int fi = f == kFeatureNone ? kNFeatures - 1 : f;
  if (f != kFeatureNone) labelledMoves_++;
  if (known) {
    fLen_[fi] += L;
    fVol_[fi] += vol;
    fTime_[fi] += dt;
    const double v = s.feedMms;
    if (v < fVMin_[fi]) fVMin_[fi] = v;
    if (v > fVMax_[fi]) fVMax_[fi] = v;
  }
  if (li >= 0 && li != kOverflowLayer && planar) {
    const double h = layerH_[li];
    if (h > 0) {
      const double w = lineWidthMm(vol / L, h);
      if (w > 0 && w < 50) {
        if (known) {
          fWidthSum_[fi] += w * L;
          fWidthLen_[fi] += L;
          if (w < fWMin_[fi]) fWMin_[fi] = w;
          if (w > fWMax_[fi]) fWMax_[fi] = w;
        }
        if (f != F_SKIRT) {
          int32_t b = jsToInt32(w / kWidthBinMm);
          if (b >= kWidthBins) b = kWidthBins - 1;
          widthHist_[b] += L;
          widthHistSum_[b] += w * L;
        }
      }
    }
  }
  // Geometry.
  const SegExtent ext(s);
  growBox(boxAll_, ext);
  const bool excluded = f == F_SKIRT || f == F_SUPPORT;
  if (f != kFeatureNone && !excluded) growBox(boxLabelled_, ext);
  if (excluded || li < 0) return;
  uint8_t bit;
  if (!preambleDecided_ && li == 0) {
    bit = kCellPreamble;
    growBox(boxPre_, ext);
  } else if (li == stackStart_) {
    bit = kCellFirst;
    growBox(boxFirst_, ext);
  } else {
    bit = kCellLater;
    growBox(boxLater_, ext);
  }
  mark(s, bit);
}

void Measurements::enterLayer(double key, double z) {
  curKey_ = key;
  auto it = layerIdByKey_.find(keyBits(key));
  if (it != layerIdByKey_.end()) {
    curLayer_ = it->second;
    return;
  }
  if (layerZ_.size() >= static_cast<size_t>(kMaxLayers)) {
    // Past the cap: keep counting layers (each new highest Z) without per-layer records.
    if (z > maxLayerZ_) {
      overflowLayers_++;
      maxLayerZ_ = z;
    }
    curLayer_ = kOverflowLayer;
    return;
  }
  const int32_t n = static_cast<int32_t>(layerZ_.size());
  if (n < 2) eBeforeRecord_[n] = netE_ - moveE_;
  if (n == 1 && !preambleDecided_) {
    // Record 0 was a prime/purge line when the print proper starts below it (slicers prime at
    // a Z above the first layer, then move down); otherwise record 0 is the first layer.
    preambleDecided_ = true;
    if (z < layerZ_[0]) {
      stackStart_ = 1;
      // A later layer at the prime line's Z is a real layer: let it get its own record.
      layerIdByKey_.erase(keyBits(jsRound(layerZ_[0] * kZKeyPerMm)));
    } else {
      stackStart_ = 0;
      // The provisional record-0 contributions belong to the first layer.
      mergeBox(boxFirst_, boxPre_);
      if (grid_) {
        uint8_t* g = grid_.get();
        for (size_t i = 0; i < static_cast<size_t>(kGridN) * kGridN; i++)
          if (g[i] & kCellPreamble) g[i] |= kCellFirst;
      }
    }
  }
  double h;
  if (n == 0 || n == stackStart_) h = z;
  else if (z > maxLayerZ_) h = z - maxLayerZ_;
  else h = layerH_[n - 1];
  if (n == 0 || n == stackStart_ || z > maxLayerZ_) maxLayerZ_ = z;
  layerIdByKey_[keyBits(key)] = n;
  layerZ_.push_back(z);
  layerH_.push_back(h);
  layerTime_.push_back(0);
  layerVol_.push_back(0);
  curLayer_ = n;
}

// Marks the 1 mm grid cells an extruding move passes through, sampled once per cell length: the
// cells of consecutive samples touch at least at a corner, so 8-neighbour groups stay connected.
void Measurements::mark(const Segment& s, uint8_t bit) {
  if (!grid_) {
    grid_.reset(static_cast<uint8_t*>(std::malloc(static_cast<size_t>(kGridN) * kGridN)));
    if (!grid_) return;  // out of memory: no objects count rather than a crash
    std::memset(grid_.get(), 0, static_cast<size_t>(kGridN) * kGridN);
  }
  uint8_t* g = grid_.get();
  const double inv = 1 / kGridCellMm;
  const double x0 = (s.x0 - kGridOriginMm) * inv;
  const double y0 = (s.y0 - kGridOriginMm) * inv;
  const double x1 = (s.x1 - kGridOriginMm) * inv;
  const double y1 = (s.y1 - kGridOriginMm) * inv;
  const int32_t n = jsToInt32(std::ceil(s.lengthMm * inv));
  const double dx = n > 0 ? (x1 - x0) / n : 0;
  const double dy = n > 0 ? (y1 - y0) / n : 0;
  constexpr int64_t kCells = static_cast<int64_t>(kGridN) * kGridN;
  // Both ends inside the grid: no clamping in the loop, and truncation is floor for positives.
  const bool inside = x0 >= 0 && y0 >= 0 && x1 >= 0 && y1 >= 0 && x0 < kGridN && x1 < kGridN && y0 < kGridN && y1 < kGridN;
  if (inside) {
    // The samples stay within the ends' box (up to rounding: [−1e-12, 2048 + 1e-12]), so a plain
    // truncating cast is `| 0`. A sample rounded onto 2048 gives an index in the next row (as in
    // TypeScript) or past the end, where a typed array writes nothing. k counts in a double
    // (exact; n may be 2³¹ − 1).
    for (double k = 0; k <= n; k += 1) {
      const int32_t yi = static_cast<int32_t>(y0 + dy * k);
      const int32_t xi = static_cast<int32_t>(x0 + dx * k);
      const uint32_t idx = static_cast<uint32_t>(yi * kGridN + xi);
      if (idx < static_cast<uint32_t>(kCells)) g[idx] |= bit;
    }
    return;
  }
  for (double k = 0; k <= n; k += 1) {
    const double i = jsMin(kGridN - 1, jsMax(0, std::floor(x0 + dx * k)));
    const double j = jsMin(kGridN - 1, jsMax(0, std::floor(y0 + dy * k)));
    if (i != i || j != j) continue;  // NaN index: no write
    g[static_cast<int64_t>(j) * kGridN + static_cast<int64_t>(i)] |= bit;
  }
}

// Connected groups (8-neighbour) of grid cells with any of the given bits.
double Measurements::countObjects(uint8_t bits, int gMinI, int gMinJ, int gMaxI, int gMaxJ) const {
  const uint8_t* g = grid_.get();
  if (g == nullptr || gMaxI < 0) return 0;
  const int w = gMaxI - gMinI + 1;
  const int h = gMaxJ - gMinJ + 1;
  // TypeScript: w·h < 0 throws (new Uint8Array of a negative length); w, h < 0 loops zero times.
  if (w <= 0 || h <= 0) return 0;
  const size_t cells = static_cast<size_t>(w) * h;
  std::unique_ptr<uint8_t[], FreeDeleter> seenBuf(static_cast<uint8_t*>(std::calloc(cells, 1)));
  std::unique_ptr<int32_t[]> stack(new (std::nothrow) int32_t[cells]);  // only written slots are read
  if (!seenBuf || !stack) return 0;
  uint8_t* seen = seenBuf.get();
  double count = 0;
  for (int j = 0; j < h; j++) {
    for (int i = 0; i < w; i++) {
      const int li = j * w + i;
      if (seen[li] || !(g[(j + gMinJ) * kGridN + i + gMinI] & bits)) continue;
      count++;
      int sp = 0;
      stack[sp++] = li;
      seen[li] = 1;
      while (sp > 0) {
        const int c = stack[--sp];
        const int ci = c % w;
        const int cj = (c - ci) / w;
        for (int dj = -1; dj <= 1; dj++) {
          const int nj = cj + dj;
          if (nj < 0 || nj >= h) continue;
          for (int di = -1; di <= 1; di++) {
            const int ni = ci + di;
            if (ni < 0 || ni >= w) continue;
            const int nl = nj * w + ni;
            if (seen[nl] || !(g[(nj + gMinJ) * kGridN + ni + gMinI] & bits)) continue;
            seen[nl] = 1;
            stack[sp++] = nl;
          }
        }
      }
    }
  }
  return count;
}

// Length-weighted median line width (mean width inside the median 0.005 mm bin), or null without planar extrusion.
std::optional<double> Measurements::medianWidthMm() const {
  double total = 0;
  for (int b = 0; b < kWidthBins; b++) total += widthHist_[b];
  if (!(total > 0)) return std::nullopt;
  double acc = 0;
  for (int b = 0; b < kWidthBins; b++) {
    acc += widthHist_[b];
    if (acc >= total / 2) return widthHistSum_[b] / widthHist_[b];
  }
  return std::nullopt;
}

void Measurements::toJson(Json& j) const {
  const double area = areaMm2_;
  // Flow percentiles from the time-weighted histogram.
  std::optional<double> p95;
  const double total = extrudeTimeS_;
  if (total > 0) {
    const double target = total * 0.95;
    double acc = 0;
    for (int b = 0; b <= kFlowBins; b++) {
      const double w = hist_[b];
      if (acc + w >= target && w > 0) {
        const double frac = (target - acc) / w;
        p95 = b == kFlowBins ? peakFlow_ : (b + frac) * kFlowBinMm3s;
        break;
      }
      acc += w;
    }
    if (p95 && *p95 > peakFlow_) p95 = peakFlow_;
  }
  // Compact 1 mm³/s histogram for charts.
  std::vector<double> coarse;
  coarse.reserve(kFlowBins / 20 + 2);
  const double per = jsRound(1 / kFlowBinMm3s);
  for (int b = 0; b <= kFlowBins; b++) {
    const size_t c = static_cast<size_t>(std::floor(b / per));
    while (coarse.size() <= c) coarse.push_back(0);
    coarse[c] += hist_[b];
  }
  while (!coarse.empty() && coarse.back() == 0) coarse.pop_back();

  const int tsN = static_cast<int>(std::min<double>(tsN_, kTimeSeriesPoints));
  const double bucket = tsBucketS_;

  // Layers of the stack (a prime line above the first layer is left out).
  const size_t start = static_cast<size_t>(stackStart_);
  const size_t nLayers = layerZ_.size();
  const size_t listed = nLayers > start ? nLayers - start : 0;
  double preS = beforeFirstS_;
  for (size_t i = 0; i < start && i < nLayers; i++) preS += layerTime_[i];
  std::vector<double> zs;
  zs.reserve(listed);
  for (size_t i = start; i < nLayers; i++) zs.push_back(layerZ_[i]);
  sortNumbers(zs);
  std::optional<double> heightMm;
  if (zs.size() >= 2) {
    // Mode of the Z steps between consecutive printed layers (µm resolution); insertion order.
    std::unordered_map<uint64_t, size_t> at;
    std::vector<std::pair<double, double>> counts;
    for (size_t i = 1; i < zs.size(); i++) {
      const double d = jsRound((zs[i] - zs[i - 1]) * 1000);
      if (d > 0) {
        auto r = at.emplace(keyBits(d), counts.size());
        if (r.second) counts.emplace_back(d, 1);
        else counts[r.first->second].second += 1;
      }
    }
    double best = 0;
    double bestN = 0;
    for (const auto& [d, n] : counts)
      if (n > bestN || (n == bestN && d < best)) {
        best = d;
        bestN = n;
      }
    if (bestN > 0) heightMm = best / 1000;
  }
  std::optional<double> firstHeightMm;
  if (!zs.empty()) firstHeightMm = zs[0];

  // Geometry: labelled files use labelled non-skirt moves; otherwise layers above the first
  // (a skirt or brim is on the first layer only), or the first layer when there is just one.
  const bool labelled = labelledMoves_ > 0;
  const bool hasLater = static_cast<double>(nLayers) - static_cast<double>(start) > 1;
  double box[6];
  bool haveBox;
  std::string sizeDetail;
  if (labelled) {
    haveBox = boxValid(boxLabelled_);
    if (haveBox) std::memcpy(box, boxLabelled_, sizeof box);
    sizeDetail = "from extruding moves labelled by the slicer, skirt, brim and support left out";
  } else if (hasLater) {
    haveBox = boxValid(boxLater_);
    const double* first = preambleDecided_ ? boxFirst_ : boxPre_;
    if (haveBox) {
      std::memcpy(box, boxLater_, sizeof box);
      if (boxValid(first)) box[2] = jsMin(boxLater_[2], first[2]);
    }
    sizeDetail = "from extruding moves above the first layer (no feature labels; skirt and brim are first-layer only)";
  } else {
    const double* first = preambleDecided_ ? boxFirst_ : boxPre_;
    if (boxValid(first)) {
      haveBox = true;
      std::memcpy(box, first, sizeof box);
    } else {
      haveBox = boxValid(boxAll_);
      if (haveBox) std::memcpy(box, boxAll_, sizeof box);
    }
    sizeDetail = "from the only printed layer";
  }
  // Extrusion centre lines sit half a line width inside the part's edge: add one outer line width.
  std::optional<double> edgeW;
  if (fLen_[0] != 0 && fWidthLen_[0] > 0) edgeW = fWidthSum_[0] / fWidthLen_[0];  // outer-wall
  else edgeW = medianWidthMm();
  double sizeX = 0, sizeY = 0, sizeZ = 0;
  if (haveBox) {
    const double wAdd = edgeW ? *edgeW : 0;
    sizeX = box[3] - box[0] + wAdd;
    sizeY = box[4] - box[1] + wAdd;
    sizeZ = box[5];
    if (edgeW) {
      sizeDetail += "; X/Y include one ";
      sizeDetail += jsToFixed(*edgeW, 3);
      sizeDetail += " mm line width (centre line to edge on both sides)";
    }
  }
  double objects = 0;
  double ext[6];
  emptyBox(ext);
  mergeBox(ext, boxPre_);
  mergeBox(ext, boxFirst_);
  mergeBox(ext, boxLater_);
  if (grid_ && ext[0] <= ext[3]) {
    auto cell = [](double v) {
      const double c = jsMin(kGridN - 1, jsMax(0, std::floor((v - kGridOriginMm) / kGridCellMm)));
      return c == c ? static_cast<int>(c) : 0;  // (NaN cannot reach here: boxes never take NaN)
    };
    const int gMinI = cell(ext[0]);
    const int gMinJ = cell(ext[1]);
    const int gMaxI = cell(ext[3]);
    const int gMaxJ = cell(ext[4]);
    const uint8_t bits = hasLater ? kCellLater : preambleDecided_ ? kCellFirst : (kCellPreamble | kCellFirst);
    objects = countObjects(bits, gMinI, gMinJ, gMaxI, gMaxJ);
  }
  // Filament fed before the print proper (prime lines in the start code): before the first
  // labelled move when the slicer labels features, else before the first layer of the stack.
  double pre = 0;
  const char* preambleDetail;
  const double recStart = start < 2 ? eBeforeRecord_[start] : NAN;
  if (labelled && eBeforeLabelled_ == eBeforeLabelled_) {
    pre = eBeforeLabelled_;
    preambleDetail = "filament fed before the first move the slicer labelled as part of the print";
  } else if (recStart == recStart) {
    pre = recStart;
    preambleDetail = start > 0 ? "filament fed before the first layer (a prime line above the first layer was found)"
                               : "filament fed before the first layer";
  } else {
    preambleDetail = "no extrusion";
  }

  j.beginObject();
  j.key("filamentAreaMm2").num(area);
  j.key("printFilamentMm").num(netE_ - pre);
  j.key("preambleFilamentMm").num(pre);
  j.key("preambleDetail").str(preambleDetail);
  j.key("netFilamentMm").num(netE_);
  j.key("extrudedFilamentMm").num(posE_);
  j.key("retractedFilamentMm").num(negE_);
  j.key("retractions").num(retractions_);
  j.key("extrudingMoves").num(extrudingMoves_);
  j.key("travelMoves").num(travelMoves_);
  j.key("extrudingLengthMm").num(extrLen_);
  j.key("nonPlanarExtrudingLengthMm").num(nonPlanarLen_);
  j.key("travelLengthMm").num(travelLen_);
  j.key("flow").beginObject();
  if (peakFlow_ >= 0) {
    j.key("peakMm3s").num(peakFlow_);
    j.key("peakLineNo").num(peakLine_);
  } else {
    j.key("peakMm3s").null();
    j.key("peakLineNo").null();
  }
  j.key("p95Mm3s").num(p95);
  if (total > 0) j.key("meanMm3s").num(extrudeVolMm3_ / total);
  else j.key("meanMm3s").null();
  j.key("histogram").beginObject();
  j.key("binMm3s").num(1.0);
  j.key("timeS").beginArray();
  for (double c : coarse) j.num(c);
  j.endArray();
  j.endObject();
  j.key("timeSeries").beginObject();
  j.key("bucketS").num(bucket);
  j.key("maxMm3s").beginArray();
  for (int i = 0; i < tsN; i++) j.num(tsMax_[i]);
  j.endArray();
  j.key("meanMm3s").beginArray();
  for (int i = 0; i < tsN; i++) j.num(tsVol_[i] / bucket);
  j.endArray();
  j.endObject();
  j.endObject();  // flow
  j.key("layers").beginObject();
  j.key("count").num(static_cast<double>(listed) + overflowLayers_);
  j.key("listed").num(static_cast<double>(listed));
  j.key("overflowTimeS").num(overflowS_);
  j.key("heightMm").num(heightMm);
  j.key("firstHeightMm").num(firstHeightMm);
  j.key("list").beginArray();
  for (size_t i = start; i < nLayers; i++) {
    j.beginObject();
    j.key("zMm").num(layerZ_[i]);
    j.key("heightMm").num(layerH_[i]);
    j.key("timeS").num(layerTime_[i]);
    j.key("volumeMm3").num(layerVol_[i]);
    j.endObject();
  }
  j.endArray();
  j.key("beforeFirstLayerS").num(preS);
  j.key("preambleExcluded").boolean(start > 0);
  j.endObject();  // layers
  j.key("bboxMm");
  if (haveBox) writeBox(j, box);
  else j.null();
  j.key("sizeMm");
  if (haveBox) {
    j.beginObject();
    j.key("x").num(sizeX);
    j.key("y").num(sizeY);
    j.key("z").num(sizeZ);
    j.endObject();
  } else {
    j.null();
  }
  j.key("sizeDetail").str(sizeDetail);
  j.key("objects").num(objects);
  j.key("features").beginArray();
  for (int i = 0; i < kNFeatures; i++) {
    if (fLen_[i] == 0) continue;
    const bool widths = fWidthLen_[i] > 0;
    j.beginObject();
    j.key("feature").str(i < kFeatureCount ? kFeatureNames[i] : "unlabelled");
    j.key("extrudedLengthMm").num(fLen_[i]);
    j.key("extrudedVolumeMm3").num(fVol_[i]);
    j.key("commandedTimeS").num(fTime_[i]);
    if (widths) {
      j.key("lineWidthMeanMm").num(fWidthSum_[i] / fWidthLen_[i]);
      j.key("lineWidthMinMm").num(fWMin_[i]);
      j.key("lineWidthMaxMm").num(fWMax_[i]);
    } else {
      j.key("lineWidthMeanMm").null();
      j.key("lineWidthMinMm").null();
      j.key("lineWidthMaxMm").null();
    }
    j.key("speedMinMms").num(fVMin_[i]);
    j.key("speedMaxMms").num(fVMax_[i]);
    if (fTime_[i] > 0) j.key("speedMeanMms").num(fLen_[i] / fTime_[i]);
    else j.key("speedMeanMms").null();
    j.endObject();
  }
  j.endArray();
  j.key("labelled").boolean(labelled);
  j.key("time").beginObject();
  j.key("estimatedS").num(planner.totalS);
  j.key("commandedS").num(commandedS_);
  j.key("dwellS").num(planner.dwellS);
  j.endObject();
  j.endObject();
}

}  // namespace hotlap
