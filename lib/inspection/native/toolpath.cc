// Mirrors lib/inspection/toolpathSettings.ts (createToolpathSettingsAnalyzer, summarise and their
// helpers). Same arithmetic in the same order; Float32Array buffers are float here, read back as
// double before any arithmetic.
#include "toolpath.h"

#include <algorithm>
#include <cmath>

namespace hotlap {

namespace {

// Caps and tunables (engineConstants.ts). WIDTH_PER_NOZZLE is only used with a nozzle hint, not ported.
using engine::CELLS_PER_WIDTH;
using engine::DEFAULT_BUDGET_BASE_CELLS;
using engine::DEFAULT_BUDGET_CELLS_PER_SEGMENT;
using engine::MAX_LAYER_SEGMENTS;
using engine::SAMPLE_WINDOW_LAYERS;
using engine::SOLID_FRACTION;
using engine::STANDARD_NOZZLES_MM;
using engine::Z_EPS_MM;
constexpr size_t MAX_LAYERS = engine::TOOLPATH_MAX_LAYERS;
constexpr double MAX_COORD_MM = engine::TOOLPATH_MAX_COORD_MM;
constexpr int HIST = 600;

// JSON.stringify writes −0 as 0.

// Index of hist[Math.min(599, Math.max(0, Math.round(v)))]; −1 when NaN (a typed-array write at
// index NaN does nothing).
inline int clampBin(double v) {
  const double r = jsMin(HIST - 1, jsMax(0, jsRound(v)));
  if (std::isnan(r)) return -1;
  return (int)r;
}

// Index of hist[Math.min(599, Math.round(v))]: negative or NaN indices write nothing; −0 is index 0.
inline int upperBin(double v) {
  const double r = jsMin(HIST - 1, jsRound(v));
  if (std::isnan(r) || r < 0) return -1;
  return (int)r;
}

inline double widthOf(double areaMm2, double h) {
  // Slic3r flow math: rectangle with semicircular ends, A = (w − h) h + π h² / 4.
  return areaMm2 / h + h * (1 - M_PI / 4);
}

// Median of a weighted histogram with bins of binMm.
double histMedian(const double* hist, int n, double binMm) {
  double total = 0;
  for (int i = 0; i < n; i++) total += hist[i];
  if (total <= 0) return 0;
  double acc = 0;
  for (int i = 0; i < n; i++) {
    acc += hist[i];
    if (acc >= total / 2) return i * binMm;
  }
  return (n - 1) * binMm;
}

// ---- Array.prototype.sort((a, b) => a - b) as V8 runs it (TimSort, ECMA-262 SortCompare: a NaN
// comparison result counts as 0). With NaN among the values the comparator is inconsistent and
// the order depends on the algorithm, so the algorithm is reproduced (V8 third_party TimSort port
// of CPython's listsort), not only its contract.
struct JsNumSort {
  std::vector<double>& a;
  struct Run {
    size_t base, len;
  };
  std::vector<Run> runs;
  size_t minGallop = 7;
  std::vector<double> tmp;

  static double cmp(double x, double y) {
    const double v = x - y;
    return std::isnan(v) ? 0 : v;
  }

  explicit JsNumSort(std::vector<double>& v) : a(v) {}

  static size_t minRunLength(size_t n) {
    size_t r = 0;
    while (n >= 64) {
      r |= n & 1;
      n >>= 1;
    }
    return n + r;
  }

  void binaryInsertionSort(size_t low, size_t startArg, size_t high) {
    size_t start = low == startArg ? startArg + 1 : startArg;
    for (; start < high; ++start) {
      size_t left = low, right = start;
      const double pivot = a[start];
      while (left < right) {
        const size_t mid = left + ((right - left) >> 1);
        if (cmp(pivot, a[mid]) < 0) right = mid;
        else left = mid + 1;
      }
      for (size_t p = start; p > left; --p) a[p] = a[p - 1];
      a[left] = pivot;
    }
  }

  size_t countAndMakeRun(size_t lowArg, size_t high) {
    const size_t low = lowArg + 1;
    if (low == high) return 1;
    size_t runLength = 2;
    const double elementLow = a[low];
    const double elementLowPre = a[low - 1];
    double order = cmp(elementLow, elementLowPre);
    const bool isDescending = order < 0;
    double previous = elementLow;
    for (size_t idx = low + 1; idx < high; ++idx) {
      const double current = a[idx];
      order = cmp(current, previous);
      if (isDescending) {
        if (order >= 0) break;
      } else {
        if (order < 0) break;
      }
      previous = current;
      ++runLength;
    }
    if (isDescending) std::reverse(a.begin() + lowArg, a.begin() + lowArg + runLength);
    return runLength;
  }

  // Offset (from base) to insert key in the sorted range [base, base+length), leftmost among equals.
  size_t gallopLeft(const double* arr, double key, size_t base, size_t length, size_t hint) {
    size_t lastOfs = 0, offset = 1;
    const double baseHintElement = arr[base + hint];
    double order = cmp(baseHintElement, key);
    if (order < 0) {
      const size_t maxOfs = length - hint;
      while (offset < maxOfs) {
        const double offsetElement = arr[base + hint + offset];
        order = cmp(offsetElement, key);
        if (order >= 0) break;
        lastOfs = offset;
        offset = (offset << 1) + 1;
        if (offset <= 0) offset = maxOfs;
      }
      if (offset > maxOfs) offset = maxOfs;
      lastOfs += hint;
      offset += hint;
    } else {
      const size_t maxOfs = hint + 1;
      while (offset < maxOfs) {
        const double offsetElement = arr[base + hint - offset];
        order = cmp(offsetElement, key);
        if (order < 0) break;
        lastOfs = offset;
        offset = (offset << 1) + 1;
        if (offset <= 0) offset = maxOfs;
      }
      if (offset > maxOfs) offset = maxOfs;
      const size_t tmpOfs = lastOfs;
      lastOfs = hint - offset;
      offset = hint - tmpOfs;
    }
    // lastOfs may be "−1" (wrapped) here: the invariant is arr[lastOfs] < key <= arr[offset].
    lastOfs++;
    while (lastOfs < offset) {
      const size_t m = lastOfs + ((offset - lastOfs) >> 1);
      order = cmp(arr[base + m], key);
      if (order < 0) lastOfs = m + 1;
      else offset = m;
    }
    return offset;
  }

  // Position to insert key, rightmost among equals.
  size_t gallopRight(const double* arr, double key, size_t base, size_t length, size_t hint) {
    size_t lastOfs = 0, offset = 1;
    const double baseHintElement = arr[base + hint];
    double order = cmp(key, baseHintElement);
    if (order < 0) {
      const size_t maxOfs = hint + 1;
      while (offset < maxOfs) {
        const double offsetElement = arr[base + hint - offset];
        order = cmp(key, offsetElement);
        if (order >= 0) break;
        lastOfs = offset;
        offset = (offset << 1) + 1;
        if (offset <= 0) offset = maxOfs;
      }
      if (offset > maxOfs) offset = maxOfs;
      const size_t tmpOfs = lastOfs;
      lastOfs = hint - offset;
      offset = hint - tmpOfs;
    } else {
      const size_t maxOfs = length - hint;
      while (offset < maxOfs) {
        const double offsetElement = arr[base + hint + offset];
        order = cmp(key, offsetElement);
        if (order < 0) break;
        lastOfs = offset;
        offset = (offset << 1) + 1;
        if (offset <= 0) offset = maxOfs;
      }
      if (offset > maxOfs) offset = maxOfs;
      lastOfs += hint;
      offset += hint;
    }
    lastOfs++;
    while (lastOfs < offset) {
      const size_t m = lastOfs + ((offset - lastOfs) >> 1);
      order = cmp(key, arr[base + m]);
      if (order < 0) offset = m;
      else lastOfs = m + 1;
    }
    return offset;
  }

  void mergeLo(size_t baseA, size_t lengthAArg, size_t baseB, size_t lengthBArg) {
    size_t lengthA = lengthAArg, lengthB = lengthBArg;
    tmp.assign(a.begin() + baseA, a.begin() + baseA + lengthA);
    size_t dest = baseA, cursorTemp = 0, cursorB = baseB;
    a[dest++] = a[cursorB++];
    bool done = false;
    if (--lengthB == 0) done = true;
    else if (lengthA == 1) {
      for (size_t i = 0; i < lengthB; i++) a[dest + i] = a[cursorB + i];
      a[dest + lengthB] = tmp[cursorTemp];
      return;
    }
    while (!done) {
      size_t nofWinsA = 0, nofWinsB = 0;
      // Straightforward merge until one run appears to win consistently.
      bool toGallop = false;
      while (true) {
        const double order = cmp(a[cursorB], tmp[cursorTemp]);
        if (order < 0) {
          a[dest++] = a[cursorB++];
          ++nofWinsB;
          --lengthB;
          nofWinsA = 0;
          if (lengthB == 0) {
            done = true;
            break;
          }
          if (nofWinsB >= minGallop) {
            toGallop = true;
            break;
          }
        } else {
          a[dest++] = tmp[cursorTemp++];
          ++nofWinsA;
          --lengthA;
          nofWinsB = 0;
          if (lengthA == 1) {
            done = true;
            break;
          }
          if (nofWinsA >= minGallop) {
            toGallop = true;
            break;
          }
        }
      }
      if (done || !toGallop) break;
      ++minGallop;
      bool firstIteration = true;
      while (nofWinsA >= 7 || nofWinsB >= 7 || firstIteration) {
        firstIteration = false;
        minGallop = minGallop > 1 ? minGallop - 1 : 1;
        nofWinsA = gallopRight(tmp.data(), a[cursorB], cursorTemp, lengthA, 0);
        if (nofWinsA > 0) {
          for (size_t i = 0; i < nofWinsA; i++) a[dest + i] = tmp[cursorTemp + i];
          dest += nofWinsA;
          cursorTemp += nofWinsA;
          lengthA -= nofWinsA;
          if (lengthA == 1) {
            done = true;
            break;
          }
          if (lengthA == 0) {
            done = true;
            break;
          }
        }
        a[dest++] = a[cursorB++];
        if (--lengthB == 0) {
          done = true;
          break;
        }
        nofWinsB = gallopLeft(a.data(), tmp[cursorTemp], cursorB, lengthB, 0);
        if (nofWinsB > 0) {
          for (size_t i = 0; i < nofWinsB; i++) a[dest + i] = a[cursorB + i];
          dest += nofWinsB;
          cursorB += nofWinsB;
          lengthB -= nofWinsB;
          if (lengthB == 0) {
            done = true;
            break;
          }
        }
        a[dest++] = tmp[cursorTemp++];
        if (--lengthA == 1) {
          done = true;
          break;
        }
      }
      if (done) break;
      ++minGallop;
    }
    if (lengthA == 1) {
      for (size_t i = 0; i < lengthB; i++) a[dest + i] = a[cursorB + i];
      a[dest + lengthB] = tmp[cursorTemp];
    } else if (lengthA > 0) {
      for (size_t i = 0; i < lengthA; i++) a[dest + i] = tmp[cursorTemp + i];
    }
  }

  void mergeHi(size_t baseA, size_t lengthAArg, size_t baseB, size_t lengthBArg) {
    size_t lengthA = lengthAArg, lengthB = lengthBArg;
    tmp.assign(a.begin() + baseB, a.begin() + baseB + lengthB);
    // Cursors are one past the element they point at (avoid size_t −1).
    size_t dest = baseB + lengthB;            // dest - 1 is the slot written next
    size_t cursorTemp = lengthB;              // cursorTemp - 1
    size_t cursorA = baseA + lengthA;         // cursorA - 1
    a[--dest] = a[--cursorA];
    bool done = false;
    if (--lengthA == 0) done = true;
    else if (lengthB == 1) {
      dest -= lengthA;
      cursorA -= lengthA;
      for (size_t i = lengthA; i-- > 0;) a[dest + i] = a[cursorA + i];
      a[dest - 1] = tmp[cursorTemp - 1];
      return;
    }
    while (!done) {
      size_t nofWinsA = 0, nofWinsB = 0;
      bool toGallop = false;
      while (true) {
        const double order = cmp(tmp[cursorTemp - 1], a[cursorA - 1]);
        if (order < 0) {
          a[--dest] = a[--cursorA];
          ++nofWinsA;
          --lengthA;
          nofWinsB = 0;
          if (lengthA == 0) {
            done = true;
            break;
          }
          if (nofWinsA >= minGallop) {
            toGallop = true;
            break;
          }
        } else {
          a[--dest] = tmp[--cursorTemp];
          ++nofWinsB;
          --lengthB;
          nofWinsA = 0;
          if (lengthB == 1) {
            done = true;
            break;
          }
          if (nofWinsB >= minGallop) {
            toGallop = true;
            break;
          }
        }
      }
      if (done || !toGallop) break;
      ++minGallop;
      bool firstIteration = true;
      while (nofWinsA >= 7 || nofWinsB >= 7 || firstIteration) {
        firstIteration = false;
        minGallop = minGallop > 1 ? minGallop - 1 : 1;
        // k = gallopRight(tmp[cursorTemp], a, baseA, lengthA, lengthA − 1); nofWinsA = lengthA − k.
        size_t k = gallopRight(a.data(), tmp[cursorTemp - 1], baseA, lengthA, lengthA - 1);
        nofWinsA = lengthA - k;
        if (nofWinsA > 0) {
          dest -= nofWinsA;
          cursorA -= nofWinsA;
          for (size_t i = nofWinsA; i-- > 0;) a[dest + i] = a[cursorA + i];
          lengthA -= nofWinsA;
          if (lengthA == 0) {
            done = true;
            break;
          }
        }
        a[--dest] = tmp[--cursorTemp];
        if (--lengthB == 1) {
          done = true;
          break;
        }
        k = gallopLeft(tmp.data(), a[cursorA - 1], 0, lengthB, lengthB - 1);
        nofWinsB = lengthB - k;
        if (nofWinsB > 0) {
          dest -= nofWinsB;
          cursorTemp -= nofWinsB;
          for (size_t i = 0; i < nofWinsB; i++) a[dest + i] = tmp[cursorTemp + i];
          lengthB -= nofWinsB;
          if (lengthB == 1) {
            done = true;
            break;
          }
          if (lengthB == 0) {
            done = true;
            break;
          }
        }
        a[--dest] = a[--cursorA];
        if (--lengthA == 0) {
          done = true;
          break;
        }
      }
      if (done) break;
      ++minGallop;
    }
    if (lengthB == 1) {
      dest -= lengthA;
      cursorA -= lengthA;
      for (size_t i = lengthA; i-- > 0;) a[dest + i] = a[cursorA + i];
      a[dest - 1] = tmp[cursorTemp - 1];
    } else if (lengthB > 0) {
      for (size_t i = 0; i < lengthB; i++) a[dest - lengthB + i] = tmp[i];
    }
  }

  void mergeAt(size_t i) {
    size_t baseA = runs[i].base, lengthA = runs[i].len;
    const size_t baseB = runs[i + 1].base;
    size_t lengthB = runs[i + 1].len;
    runs[i].len = lengthA + lengthB;
    if (i + 3 == runs.size()) runs[i + 1] = runs[i + 2];
    runs.pop_back();
    const size_t k = gallopRight(a.data(), a[baseB], baseA, lengthA, 0);
    baseA += k;
    lengthA -= k;
    if (lengthA == 0) return;
    lengthB = gallopLeft(a.data(), a[baseA + lengthA - 1], baseB, lengthB, lengthB - 1);
    if (lengthB == 0) return;
    if (lengthA <= lengthB) mergeLo(baseA, lengthA, baseB, lengthB);
    else mergeHi(baseA, lengthA, baseB, lengthB);
  }

  void mergeCollapse() {
    while (runs.size() > 1) {
      size_t n = runs.size() - 2;
      if ((n >= 1 && runs[n - 1].len <= runs[n].len + runs[n + 1].len) ||
          (n >= 2 && runs[n - 2].len <= runs[n - 1].len + runs[n].len)) {
        if (runs[n - 1].len < runs[n + 1].len) --n;
        mergeAt(n);
      } else if (runs[n].len <= runs[n + 1].len) {
        mergeAt(n);
      } else {
        break;
      }
    }
  }

  void mergeForceCollapse() {
    while (runs.size() > 1) {
      size_t n = runs.size() - 2;
      if (n > 0 && runs[n - 1].len < runs[n + 1].len) --n;
      mergeAt(n);
    }
  }

  void sort() {
    const size_t length = a.size();
    if (length < 2) return;
    size_t remaining = length, low = 0;
    const size_t minRun = minRunLength(remaining);
    while (remaining != 0) {
      size_t currentRunLength = countAndMakeRun(low, low + remaining);
      if (currentRunLength < minRun) {
        const size_t forced = std::min(minRun, remaining);
        binaryInsertionSort(low, low + currentRunLength, low + forced);
        currentRunLength = forced;
      }
      runs.push_back({low, currentRunLength});
      mergeCollapse();
      low += currentRunLength;
      remaining -= currentRunLength;
    }
    mergeForceCollapse();
  }
};

// median() of toolpathSettings.ts: v.slice().sort((a, b) => a - b), middle (mean of middle two).
double median(const std::vector<double>& v, std::vector<double>& scratch) {
  scratch.assign(v.begin(), v.end());
  bool anyNaN = false;
  for (double x : scratch)
    if (std::isnan(x)) anyNaN = true;
  if (anyNaN) {
    JsNumSort(scratch).sort();
  } else {
    // A consistent comparator: every stable sort gives V8's order.
    std::stable_sort(scratch.begin(), scratch.end(), [](double a, double b) { return a - b < 0; });
  }
  const size_t m = scratch.size() >> 1;
  return scratch.size() % 2 ? scratch[m] : (scratch[m - 1] + scratch[m]) / 2;
}

struct Mode {
  double value;
  long long count, total;
};

template <typename K>
std::optional<Mode> modeOf(const CountMap<K>& m) {
  bool has = false;
  double best = 0;
  long long bestN = 0, total = 0;
  for (const auto& e : m.entries) {
    const double v = (double)e.first;
    const long long n = e.second;
    total += n;
    if (n > bestN || (n == bestN && has && v < best)) {
      best = v;
      bestN = n;
      has = true;
    }
  }
  if (!has) return std::nullopt;
  return Mode{best, bestN, total};
}

std::string pct(double a, double b) { return jsNumber(jsRound((a / b) * 100)) + " %"; }

}  // namespace

ToolpathSettingsAnalyzer::ToolpathSettingsAnalyzer(double filamentDiameterMm)
    : areaOfFilamentMm2_(filamentAreaMm2(filamentDiameterMm)),
      cellBudgetBase_(DEFAULT_BUDGET_BASE_CELLS),
      cellBudgetPerSegment_(DEFAULT_BUDGET_CELLS_PER_SEGMENT) {
  seg_.resize(5 * 4096);
  chainOf_.resize(4096);
  segLen_.resize(4096);
  wallLabel_.resize(4096);
  chainStart_.resize(1024);
  std::fill(std::begin(widthScratch_), std::end(widthScratch_), 0.0);
  std::fill(std::begin(loopWidthHist_), std::end(loopWidthHist_), 0.0);
  std::fill(std::begin(outerSpacingHist_), std::end(outerSpacingHist_), 0.0);
  recent_.reserve(12);
  bandVotes_.reserve(64);
}

void ToolpathSettingsAnalyzer::ensureCapacity() {
  if ((size_t)nSeg_ * 5 + 5 > seg_.size()) {
    seg_.resize(seg_.size() * 2);
    chainOf_.resize(chainOf_.size() * 2);
    segLen_.resize(segLen_.size() * 2);
    wallLabel_.resize(wallLabel_.size() * 2);
  }
}

void ToolpathSettingsAnalyzer::newChain() {
  if ((size_t)nChains_ + 1 >= chainStart_.size()) chainStart_.resize(chainStart_.size() * 2);
  chainStart_[nChains_++] = nSeg_;
}

void ToolpathSettingsAnalyzer::segment(const Segment& s) {
  if (!s.extruding) {
    if (s.x0 != s.x1 || s.y0 != s.y1 || s.eMm < 0) broken_ = true;
    return;
  }
  const double dx = s.x1 - s.x0;
  const double dy = s.y1 - s.y0;
  const double lenXY = std::sqrt(dx * dx + dy * dy);
  if (!(lenXY >= 1e-6) || !std::isfinite(lenXY) || !std::isfinite(s.z1) || !std::isfinite(s.eMm) ||
      std::fabs(s.x0) > MAX_COORD_MM || std::fabs(s.y0) > MAX_COORD_MM || std::fabs(s.x1) > MAX_COORD_MM ||
      std::fabs(s.y1) > MAX_COORD_MM) {
    // Zero-length, non-finite or absurd (beyond any build volume) moves say nothing about settings.
    if (lenXY >= 1e-6 && absurdMoves_++ == 0 && warnings_.size() < 20)
      warnings_.push_back("Line " + jsNumber(s.lineNo) +
                          ": a move with non-finite or out-of-range coordinates was left out of the settings analysis.");
    return;
  }
  const double z = s.z1;
  if (!(std::fabs(z - layerZ_) <= Z_EPS_MM)) {
    // Moves that climb while extruding (spiral "vase" mode) stay on the current layer.
    const bool spiral = std::fabs(s.z1 - s.z0) > 1e-4 && (nSeg_ > 0 || nSkippedSeg_ > 0) && std::fabs(z - layerZ_) < 0.05;
    if (!spiral) {
      finishLayer();
      layerZ_ = z;
      broken_ = true;
    }
  }
  segmentsSeen_++;
  if (skipStoring_) {
    // This layer will not be rasterised (work budget): keep only its volume.
    stVol_ += s.eMm * areaOfFilamentMm2_;
    nSkippedSeg_++;
    return;
  }
  if (nSeg_ >= MAX_LAYER_SEGMENTS) {
    layerTruncated_ = true;
    return;
  }
  ensureCapacity();
  if (broken_ || std::fabs(s.x0 - stEndX_) > 1e-3 || std::fabs(s.y0 - stEndY_) > 1e-3) newChain();
  broken_ = false;
  const double areaMm2 = (s.eMm * areaOfFilamentMm2_) / lenXY;
  const size_t o = (size_t)nSeg_ * 5;
  float* sp = seg_.data() + o;
  sp[0] = (float)s.x0;
  sp[1] = (float)s.y0;
  sp[2] = (float)s.x1;
  sp[3] = (float)s.y1;
  sp[4] = (float)areaMm2;
  segLen_[nSeg_] = (float)lenXY;
  chainOf_[nSeg_] = nChains_ - 1;
  // Feature labels are kept only to cross-check the measurement afterwards, never to make it.
  const int f = s.feature;
  wallLabel_[nSeg_] = f == F_OUTER_WALL || f == F_INNER_WALL || f == F_OVERHANG_WALL ? 1 : 0;
  nSeg_++;
  stVol_ += areaMm2 * lenXY;
  if (s.x0 < stMinX_) stMinX_ = s.x0;
  if (s.x0 > stMaxX_) stMaxX_ = s.x0;
  if (s.x1 < stMinX_) stMinX_ = s.x1;
  if (s.x1 > stMaxX_) stMaxX_ = s.x1;
  if (s.y0 < stMinY_) stMinY_ = s.y0;
  if (s.y0 > stMaxY_) stMaxY_ = s.y0;
  if (s.y1 < stMinY_) stMinY_ = s.y1;
  if (s.y1 > stMaxY_) stMaxY_ = s.y1;
  stEndX_ = s.x1;
  stEndY_ = s.y1;
}

void ToolpathSettingsAnalyzer::finishLayer() {
  if (nSeg_ == 0 && nSkippedSeg_ == 0) return;
  if (nSeg_ == 0) {
    // Not stored: record the layer for heights and counts only.
    const double z = layerZ_;
    layerThickness(z, nSkippedSeg_);
    layerCount_++;
    skippedLayers_++;
    columns_.abandon();
    noteHeights(z, nSkippedSeg_, stVol_, std::isnan(prevLayerZ_));
    prevLayerZ_ = z;
    nSkippedSeg_ = 0;
    stVol_ = 0;
    decideStoring();
    return;
  }
  const double z = layerZ_;
  const double h = layerThickness(z, nSeg_);
  noteHeights(z, nSeg_, stVol_, std::isnan(prevLayerZ_));
  analyseLayer(z, h, std::isnan(prevLayerZ_));
  // Figures are kept once the layer is done (also when its analysis stopped part way).
  if (currentRec_ != nullptr && currentIndex_ >= 0 && layerHasFigures(*currentRec_))
    table_.addFigures((size_t)currentIndex_, *currentRec_);
  currentRec_ = nullptr;
  prevLayerZ_ = z;
  nSeg_ = 0;
  nChains_ = 0;
  stVol_ = 0;
  stMinX_ = INFINITY;
  stMinY_ = INFINITY;
  stMaxX_ = -INFINITY;
  stMaxY_ = -INFINITY;
  nSkippedSeg_ = 0;
  decideStoring();
  if (layerTruncated_ && warnings_.size() < 20)
    warnings_.push_back("Layer at Z " + jsToFixed(z, 3) + " has more than " + jsNumber(MAX_LAYER_SEGMENTS) +
                        " moves; only the first were analysed.");
  layerTruncated_ = false;
}

double ToolpathSettingsAnalyzer::layerThickness(double z, double moves) {
  if (!std::isnan(prevLayerZ_)) {
    const double step = z - prevLayerZ_;
    if (step < -Z_EPS_MM || (step > 2 && step > 5 * lastThicknessMm_)) {
      columns_.finish();
      sequence_++;
      prevLayerZ_ = NAN;
    }
  }
  double h;
  if (!std::isnan(prevLayerZ_)) h = z - prevLayerZ_;
  else if (z <= 2) h = z;
  else h = firstLayerThicknessMm_ > 0 ? firstLayerThicknessMm_ : lastThicknessMm_;
  if (moves >= 20 && h > 0) {
    if (firstLayerThicknessMm_ == 0 && std::isnan(prevLayerZ_) && z <= 2) firstLayerThicknessMm_ = h;
    lastThicknessMm_ = h;
  }
  return h;
}

void ToolpathSettingsAnalyzer::noteHeights(double z, double moves, double volumeMm3, bool firstOfSequence) {
  const bool major = moves >= 20;
  if (firstOfSequence) {
    prevMajorZ_ = NAN;
    if (sequenceFirsts_.size() < 1000) sequenceFirsts_.push_back({z, volumeMm3, moves});
  }
  if (major && !std::isnan(prevMajorZ_)) {
    const double d = jsRound((z - prevMajorZ_) * 1000) / 1000;
    if (d > 0 && zSteps_.size() < 10000) zSteps_.add(d);
  }
  prevMajorZ_ = major ? z : NAN;
}

void ToolpathSettingsAnalyzer::decideStoring() {
  if (!sampling_ || windowLeft_ > 0) {
    skipStoring_ = false;
    return;
  }
  const double budget = cellBudgetBase_ + cellBudgetPerSegment_ * segmentsSeen_;
  skipStoring_ = budget - spentCells_ < SAMPLE_WINDOW_LAYERS * lastLayerCells_;
}

double ToolpathSettingsAnalyzer::layerMedianWidth(double h) {
  double* hist = widthScratch_;
  std::fill(hist, hist + HIST, 0.0);
  const float* sp = seg_.data();
  for (int i = 0; i < nSeg_; i++) {
    const size_t o = (size_t)i * 5;
    const double w = widthOf(sp[o + 4], h);
    const double len = segLen_[i];
    const int b = clampBin(w / 0.005);
    if (b >= 0) hist[b] += len;
  }
  return histMedian(hist, HIST, 0.005);
}

void ToolpathSettingsAnalyzer::analyseLayer(double z, double h, bool firstOfSequence) {
  layerCount_++;
  LayerRecord fresh;
  fresh.z = z;
  fresh.h = h;
  fresh.volumeMm3 = stVol_;
  fresh.segments = nSeg_;
  fresh.firstOfSequence = firstOfSequence;
  fresh.sequence = sequence_;
  currentIndex_ = -1;
  if (table_.layers() < MAX_LAYERS) {
    currentIndex_ = (long long)table_.addLayer(fresh.volumeMm3);
    recent_.push_back(fresh);
    if (recent_.size() > 11) recent_.erase(recent_.begin());
    currentRec_ = &recent_.back();
  } else {
    standaloneRec_ = fresh;
    currentRec_ = &standaloneRec_;
  }
  LayerRecord& rec = *currentRec_;
  if (!(h > 0.01 && h < 2)) {
    columns_.abandon();
    return;
  }

  double medianWidth = refWidthMm_ == 0 ? layerMedianWidth(h) : 0;
  if (refWidthMm_ == 0 && nSeg_ < 20) {
    // A prime line or purge before the print: too little to size the grid from.
    columns_.abandon();
    return;
  }
  if (refWidthMm_ == 0) {
    if (!(medianWidth > 0.05)) medianWidth = 0.45;  // no nozzle hint
    refWidthMm_ = medianWidth;
    // Block size: wide enough to see sparse infill as sparse, fixed for the whole file.
    blockMm_ = jsMin(6, jsMax(2, 4.5 * refWidthMm_));
  }

  // Grid: origin on the global block lattice so blocks line up from layer to layer.
  const double minX = stMinX_;
  const double minY = stMinY_;
  const double maxX = stMaxX_;
  const double maxY = stMaxY_;
  const double B = blockMm_;
  const double ox = std::floor(minX / B) * B - B;
  const double oy = std::floor(minY / B) * B - B;
  const double spanX = std::ceil((maxX - ox) / B) * B + B;
  const double spanY = std::ceil((maxY - oy) / B) * B + B;
  // Cell size from this layer's own typical width (the first layer often differs from the rest).
  if (medianWidth == 0) medianWidth = layerMedianWidth(h);
  if (!(medianWidth > 0.05)) medianWidth = refWidthMm_;
  double k = jsMax(1, jsRound(B / (jsMax(medianWidth, 0.5 * refWidthMm_) / CELLS_PER_WIDTH)));
  while (k > 1 && (spanX / B) * k * ((spanY / B) * k) > kMaxGridCells) k--;
  const double nbx = jsRound(spanX / B);
  const double nby = jsRound(spanY / B);
  if (nbx * k * nby * k > kMaxGridCells) {
    // Bed-sized spread at a 1-cell-per-block grid still too large: skip the raster for this layer.
    if (warnings_.size() < 20)
      warnings_.push_back("Layer at Z " + jsToFixed(z, 3) + " spans " + jsToFixed(maxX - minX, 0) + " × " +
                          jsToFixed(maxY - minY, 0) + " mm, too large to rasterise; skipped.");
    columns_.abandon();
    return;
  }
  const double c = B / k;
  const double cells = nbx * k * nby * k;
  lastLayerCells_ = cells;
  // Work budget: analyse every layer while the budget lasts, then windows of consecutive layers.
  const double budget = cellBudgetBase_ + cellBudgetPerSegment_ * segmentsSeen_;
  if (windowLeft_ > 0) windowLeft_--;
  else if (spentCells_ + cells > budget || sampling_) {
    sampling_ = true;
    if (budget - spentCells_ >= SAMPLE_WINDOW_LAYERS * cells) {
      windowLeft_ = SAMPLE_WINDOW_LAYERS - 1;
    } else {
      skippedLayers_++;
      columns_.abandon();
      return;
    }
  }
  spentCells_ += cells;
  analysedLayers_++;
  const int nChains = nChains_;
  const int nSeg = nSeg_;
  const float* seg = seg_.data();
  const float* segLen = segLen_.data();
  const int32_t* chainOf = chainOf_.data();
  const int32_t* chainStart = chainStart_.data();
  // Chain closure → loops. A loop returns within 2 widths of its start and encloses some area.
  isLoop_.assign((size_t)nChains, 0);
  uint8_t* isLoop = isLoop_.data();
  for (int ch = 0; ch < nChains; ch++) {
    const int a = chainStart[ch];
    const int b = ch + 1 < nChains ? chainStart[ch + 1] : nSeg;
    if (b - a < 3) continue;
    const double sx = seg[(size_t)a * 5];
    const double sy = seg[(size_t)a * 5 + 1];
    const double ex = seg[(size_t)(b - 1) * 5 + 2];
    const double ey = seg[(size_t)(b - 1) * 5 + 3];
    const double tol = jsMax(2 * medianWidth, 0.5);
    if ((ex - sx) * (ex - sx) + (ey - sy) * (ey - sy) > tol * tol) continue;
    double area2 = 0;
    for (int i = a; i < b; i++) {
      const size_t o = (size_t)i * 5;
      area2 += (double)seg[o] * (double)seg[o + 3] - (double)seg[o + 2] * (double)seg[o + 1];
    }
    area2 += ex * sy - sx * ey;
    if (std::fabs(area2) / 2 < 2 * medianWidth * medianWidth) continue;
    isLoop[ch] = 1;
  }

  const int gnx = (int)(nbx * k), gny = (int)(nby * k);
  grid_.reset(ox, oy, c, gnx, gny);
  const double inflate = c * 0.25;
  for (int i = 0; i < nSeg; i++) {
    const size_t o = (size_t)i * 5;
    const double A = seg[o + 4];
    const double x0 = seg[o];
    const double y0 = seg[o + 1];
    const double x1 = seg[o + 2];
    const double y1 = seg[o + 3];
    const double len = segLen[i];
    const double w = jsMin(5 * medianWidth, jsMax(0.05, widthOf(A, h)));
    grid_.paint(x0, y0, x1, y1, w / 2 + inflate, A * len, isLoop[chainOf[i]] == 1 ? chainOf[i] : -1);
  }
  grid_.classify(2 * medianWidth);
  grid_.distanceTransform();

  // Walls: from points along each loop, walk out of the part both ways along the normal and count
  // the other loops crossed; the shorter way out gives the loop's band (outer wall = band 1).
  size_t loopBands = 0;
  wallLoop_.assign((size_t)nChains, 0);
  uint8_t* wallLoop = wallLoop_.data();
  double* widthHistLayer = widthHistLayer_;
  double* outerHistLayer = outerHistLayer_;
  std::fill(widthHistLayer, widthHistLayer + HIST, 0.0);
  std::fill(outerHistLayer, outerHistLayer + HIST, 0.0);
  double spacingSum = 0;
  double spacingLen = 0;
  uint8_t bandsSeen[16] = {0};
  int32_t seen[16] = {0};
  const double maxWalkMm = 16 * medianWidth;
  // One cell of slack: the walk moves in half cells and paint edges are cell-quantised.
  const double adjacentMm = 1.2 * medianWidth + c;
  std::vector<double>& bandVotes = bandVotes_;
  for (int ch = 0; ch < nChains; ch++) {
    if (!isLoop[ch]) continue;
    const int a = chainStart[ch];
    const int b = ch + 1 < nChains ? chainStart[ch + 1] : nSeg;
    double loopLen = 0;
    for (int i = a; i < b; i++) {
      const size_t o = (size_t)i * 5;
      const double len = segLen[i];
      loopLen += len;
      const double A = seg[o + 4];
      spacingSum += (A / h) * len;
      spacingLen += len;
      const int bw = clampBin(widthOf(A, h) / 0.005);
      if (bw >= 0) widthHistLayer[bw] += len;
    }
    // About 16 probes per loop, spread evenly along it.
    const double every = loopLen / 16;
    double acc = every / 2;
    bandVotes.clear();
    double adjacentVotes = 0;
    for (int i = a; i < b; i++) {
      const size_t o = (size_t)i * 5;
      const double x0 = seg[o];
      const double y0 = seg[o + 1];
      const double ex = (double)seg[o + 2] - x0;
      const double ey = (double)seg[o + 3] - y0;
      const double len = segLen[i];
      while (acc < len) {
        const double t = acc / len;
        const double px = x0 + ex * t;
        const double py = y0 + ey * t;
        const double nx = -ey / len;
        const double ny = ex / len;
        const int n1 = grid_.loopsCrossed(px, py, nx, ny, ch, maxWalkMm, seen, 16);
        const double g1 = grid_.lastGapMm;
        const int n2 = n1 >= 0 ? grid_.loopsCrossed(px, py, -nx, -ny, ch, maxWalkMm, seen, 16, n1)
                               : grid_.loopsCrossed(px, py, -nx, -ny, ch, maxWalkMm, seen, 16);
        const double g2 = grid_.lastGapMm;
        // The shorter way out: fewer loops crossed, then the nearer neighbour.
        const bool use1 = n2 < 0 || (n1 >= 0 && (n1 < n2 || (n1 == n2 && g1 <= g2)));
        const int n = use1 ? n1 : n2;
        if (n >= 0) {
          bandVotes.push_back(n + 1);
          // A wall touches the next loop out (or the outside) within about one width.
          if ((use1 ? g1 : g2) <= adjacentMm) adjacentVotes++;
        }
        acc += every;
      }
      acc -= len;
    }
    if (bandVotes.size() > 0 && adjacentVotes < 0.7 * (double)bandVotes.size()) {
      rec.innerLoops++;
    } else if (bandVotes.size() > 0) {
      const double band = jsRound(median(bandVotes, sortScratch_));
      if (band == 1) {
        for (int i = a; i < b; i++) {
          const size_t o = (size_t)i * 5;
          const double len = segLen[i];
          const int bo = clampBin((double)seg[o + 4] / h / 0.005);
          if (bo >= 0) outerHistLayer[bo] += len;
        }
      }
      loopBands++;
      wallLoop[ch] = 1;
      if (band < 16) bandsSeen[(int)band] = 1;
    }
  }
  for (int i = 0; i < nSeg; i++) {
    if (!wallLabel_[i]) continue;
    const double len = segLen[i];
    labelledWallMm_ += len;
    if (wallLoop[chainOf[i]]) labelledWallInLoopsMm_ += len;
  }
  std::optional<double> loopWidth;
  if (spacingLen > 0) loopWidth = histMedian(widthHistLayer, HIST, 0.005);
  rec.loopWidthMm = loopWidth;
  if (loopBands > 0) {
    int K = 0;
    while (K + 1 < 16 && bandsSeen[K + 1]) K++;
    rec.walls = K;
  }
  if (rec.walls && *rec.walls > 0 && !firstOfSequence) {
    for (int bb = 0; bb < HIST; bb++) {
      loopWidthHist_[bb] += widthHistLayer[bb];
      outerSpacingHist_[bb] += outerHistLayer[bb];
    }
  }

  // Infill region: deeper than the innermost wall's inner edge plus 1.5 widths.
  const double wallEdgeMm = (rec.walls && *rec.walls != 0 ? *rec.walls : 2) * (loopWidth ? *loopWidth : medianWidth);
  const double deepUnits = ((wallEdgeMm + 1.5 * medianWidth) / c) * 3;
  const size_t nBlocks = (size_t)(nbx * nby);
  if (blockBuf_.size() < nBlocks * 3) blockBuf_.assign(nBlocks * 3, 0.0);
  grid_.blockStats((int)k, deepUnits, blockBuf_.data());
  // Cross-section of the infill lines against the walls' (both as A ÷ h).
  if (spacingLen > 0) {
    double* hist = widthScratch_;
    std::fill(hist, hist + HIST, 0.0);
    bool any = false;
    for (int i = 0; i < nSeg; i++) {
      if (isLoop[chainOf[i]]) continue;
      const size_t o = (size_t)i * 5;
      const double mx = ((double)seg[o] + (double)seg[o + 2]) / 2;
      const double my = ((double)seg[o + 1] + (double)seg[o + 3]) / 2;
      if ((grid_.depthAtMm(mx, my) / c) * 3 <= deepUnits) continue;
      const int bi = upperBin((double)seg[o + 4] / h / 0.005);
      if (bi >= 0) hist[bi] += segLen[i];
      any = true;
    }
    if (any) rec.infillToWallSection = histMedian(hist, HIST, 0.005) / (spacingSum / spacingLen);
  }
  // Combined infill: the n − 1 layers below have no sparse region and this layer's infill lines
  // carry at least ~n × the walls' cross-section.
  if (rec.infillToWallSection && *rec.infillToWallSection >= 1.4) {
    const double ratio = *rec.infillToWallSection;
    int emptyBelow = 0;
    for (long long j = (long long)recent_.size() - 2; j >= 0 && emptyBelow < 9; j--) {
      const LayerRecord& bl = recent_[(size_t)j];
      if (bl.sequence != rec.sequence || bl.sparseBlocks > 0 || bl.solidBlocks > 0 || bl.firstOfSequence) break;
      emptyBelow++;
    }
    const int n = emptyBelow + 1;
    if (n >= 2 && ratio >= 0.7 * n) rec.combinedLayers = n;
  }
  const double hEff = h * rec.combinedLayers;
  columns_.beginLayer();
  const long long bx0 = (long long)jsRound(ox / B);
  const long long by0 = (long long)jsRound(oy / B);
  const double cellArea = c * c;
  const double blockCells = k * k;
  const int nbxI = (int)nbx, nbyI = (int)nby;
  const double* bb = blockBuf_.data();
  for (int by = 0; by < nbyI; by++) {
    for (int bx = 0; bx < nbxI; bx++) {
      const size_t o = ((size_t)by * nbxI + bx) * 3;
      const double fCells = bb[o];
      const double dCells = bb[o + 1];
      const double dVol = bb[o + 2];
      rec.deepVolMm3 += dVol;
      rec.deepAreaMm2 += dCells * cellArea;
      int state;
      if (fCells < 0.1 * blockCells) state = kBEmpty;
      else if (dCells >= blockCells) {
        const double frac = dVol / (dCells * cellArea * hEff);
        if (frac >= SOLID_FRACTION) {
          state = kBSolid;
          rec.solidBlocks++;
        } else {
          state = kBSparse;
          rec.sparseBlocks++;
          rec.sparseVolMm3 += dVol;
          rec.sparseAreaMm2 += dCells * cellArea;
        }
      } else state = kBEdge;
      if (state != kBEmpty) columns_.set(ColumnTracker::key(bx0 + bx, by0 + by), state);
    }
  }
  columns_.endLayer();
}

void ToolpathSettingsAnalyzer::end() {
  finishLayer();
  columns_.finish();
}

void ToolpathSettingsAnalyzer::summarise(MeasuredSettings& out) const {
  auto unknown = [](const char* detail) { return MeasuredFigure{std::nullopt, detail}; };
  out.walls = unknown("No layers with closed loops.");
  out.top_layers = unknown("No top surface with sparse infill below it.");
  out.bottom_layers = unknown("No bottom surface with sparse infill above it.");
  out.infill_percent = unknown("No layer has a sparse-infill region wide enough to measure.");
  out.layer_height_mm = unknown("Fewer than two layers.");
  out.first_layer_height_mm = unknown("No extrusion.");
  out.line_width_mm = unknown("No wall loops.");
  out.nozzle_mm = unknown("No wall loops.");
  out.layers = layerCount_;
  out.infill_every_layers = 1;
  out.analysedLayers = 0;
  out.labelledWallAgreement = std::nullopt;
  out.warnings = warnings_;
  if (table_.layers() == 0 && zSteps_.size() == 0) return;

  // Substantive layers: at least 10 % of the median layer volume (drops prime lines and wipes).
  const double medVol = table_.medianVolume();
  std::vector<LayerRow> main;
  const size_t mainCount = table_.mainRows(0.1 * medVol, main);

  // Layer height: mode of the Z steps. First layer: the lowest sequence start that is a real layer.
  const auto stepMode = modeOf(zSteps_);
  if (stepMode)
    out.layer_height_mm = {stepMode->value, "Mode of " + jsNumber((double)stepMode->total) + " Z steps; " +
                                                pct((double)stepMode->count, (double)stepMode->total) + " are " +
                                                jsToFixed(stepMode->value, 3) + " mm."};
  {
    bool anyStart = false;
    double z = INFINITY;  // Math.min(...)
    for (const auto& f : sequenceFirsts_) {
      if (f.moves >= 20 && f.volumeMm3 >= 0.1 * medVol) {
        anyStart = true;
        z = jsMin(z, f.z);
      }
    }
    if (anyStart) out.first_layer_height_mm = {jsRound(z * 1000) / 1000, "Z of the lowest printed layer (bed at Z 0)."};
  }

  // Walls: mode over "clean" sparse layers, then any layer with sparse infill, then mid-height layers.
  auto hasWalls = [](const LayerRow& l) { return l.walls && *l.walls > 0 && !l.firstOfSequence; };
  std::vector<const LayerRow*> clean, withSparse, mid;
  const double lo = std::floor((double)mainCount * 0.2);
  const double hi = jsMax(lo + 1, std::ceil((double)mainCount * 0.8));
  for (const auto& l : main) {
    if (hasWalls(l) && l.sparseBlocks > 0 && l.solidBlocks == 0 && l.innerLoops == 0) clean.push_back(&l);
    if (hasWalls(l) && l.sparseBlocks > 0) withSparse.push_back(&l);
    if (l.mainIndex >= lo && l.mainIndex < hi && hasWalls(l)) mid.push_back(&l);
  }
  const std::vector<const LayerRow*>* wallLayers;
  const char* wallNote;
  if (clean.size() >= 1) {
    wallLayers = &clean;
    wallNote = "sparse layers without extra loops";
  } else if (withSparse.size() >= 3) {
    wallLayers = &withSparse;
    wallNote = "layers with sparse infill";
  } else {
    wallLayers = &mid;
    wallNote = "mid-height layers";
  }
  if (!wallLayers->empty()) {
    CountMap<double> m;
    for (const LayerRow* l : *wallLayers) m.add(*l->walls);
    const auto wm = modeOf(m);
    out.walls = {wm->value, "Closed loops counted from the outside in; mode over " + jsNumber((double)wm->total) + " " +
                                wallNote + " (Z " + jsToFixed(wallLayers->front()->z, 2) + "–" +
                                jsToFixed(wallLayers->back()->z, 2) + " mm); " +
                                pct((double)wm->count, (double)wm->total) + " agree."};
  }

  // Top and bottom: mode over columns.
  const auto bm = modeOf(columns_.bottomRuns);
  if (bm)
    out.bottom_layers = {bm->value, "Solid layers over bottom surfaces in " + jsNumber((double)bm->total) +
                                        " 2 mm columns; " + pct((double)bm->count, (double)bm->total) + " show " +
                                        jsNumber(bm->value) + "."};
  const auto tm = modeOf(columns_.topRuns);
  if (tm)
    out.top_layers = {tm->value, "Solid layers under top surfaces in " + jsNumber((double)tm->total) + " columns; " +
                                     pct((double)tm->count, (double)tm->total) + " show " + jsNumber(tm->value) + "."};

  // Infill: extruded volume ÷ (area × h) of the infill region, summed over the layers of a tier.
  const std::optional<double> wallsMode = out.walls.value;
  std::vector<const LayerRow*> tier0, tier1, tier2;
  for (const auto& l : main) {
    if (!(!l.firstOfSequence && l.sparseBlocks >= 1 && l.deepAreaMm2 >= 16)) continue;
    if (l.solidBlocks == 0 && l.innerLoops == 0 && (!wallsMode || !l.walls || *l.walls <= *wallsMode)) tier0.push_back(&l);
    if (l.solidBlocks == 0) tier1.push_back(&l);
    if (l.sparseAreaMm2 > 0) tier2.push_back(&l);
  }
  const std::vector<const LayerRow*>* tier = nullptr;
  const char* tierNote = "";
  bool sparseOnly = false;
  if (!tier0.empty()) {
    tier = &tier0;
    tierNote = "sparse throughout, no loops inside the walls";
  } else if (!tier1.empty()) {
    tier = &tier1;
    tierNote = "sparse throughout";
  } else if (!tier2.empty()) {
    tier = &tier2;
    tierNote = "with some sparse region";
    sparseOnly = true;
  }
  if (tier) {
    double vol = 0;
    double areaH = 0;
    std::vector<double> fr;
    fr.reserve(tier->size());
    double n = -INFINITY;  // Math.max(...)
    for (const LayerRow* l : *tier) {
      const double v = sparseOnly ? l->sparseVolMm3 : l->deepVolMm3;
      const double ar = sparseOnly ? l->sparseAreaMm2 : l->deepAreaMm2;
      const double hEff = l->h * l->combinedLayers;
      vol += v;
      areaH += ar * hEff;
      fr.push_back((v / (ar * hEff)) * 100);
      n = jsMax(n, l->combinedLayers);
    }
    double frMin = INFINITY, frMax = -INFINITY;
    for (double x : fr) {
      frMin = jsMin(frMin, x);
      frMax = jsMax(frMax, x);
    }
    std::vector<double> scratch;
    std::string detail = "Volume fraction of the infill region over " + jsNumber((double)tier->size()) + " layers " +
                         tierNote + " (per layer " + jsToFixed(frMin, 1) + "–" + jsToFixed(frMax, 1) + " %, median " +
                         jsToFixed(median(fr, scratch), 1) + " %).";
    if (n > 1)
      detail += " Infill is combined: one thick infill layer every " + jsNumber(n) + " layers, counted over its full height.";
    out.infill_percent = {jsRound((vol / areaH) * 1000) / 10, detail};
    out.infill_every_layers = n;
  }

  const double lw = histMedian(loopWidthHist_, HIST, 0.005);
  if (lw > 0) {
    out.line_width_mm = {jsRound(lw * 1000) / 1000, "Median wall-loop width from the flow model (rectangle with round ends)."};
    // Nozzle: the outer wall's extrusion spacing A ÷ h snapped to the nearest standard size by
    // ratio (std::log here, Math.log there: may differ by an ulp, only compared, never printed).
    const double spacing = histMedian(outerSpacingHist_, HIST, 0.005);
    double nozzle = STANDARD_NOZZLES_MM[0];
    for (size_t i = 1; i < sizeof STANDARD_NOZZLES_MM / sizeof STANDARD_NOZZLES_MM[0]; i++) {
      const double b = STANDARD_NOZZLES_MM[i];
      if (std::fabs(std::log(spacing / b)) < std::fabs(std::log(spacing / nozzle))) nozzle = b;
    }
    out.nozzle_mm = {nozzle, "Estimate: outer-wall extrusion spacing " + jsToFixed(spacing, 3) + " mm (all walls: width " +
                                 jsToFixed(lw, 3) +
                                 " mm) snapped to the nearest standard nozzle size; slicers let line width differ from the nozzle, so treat as a hint."};
  }
  if (columns_.overflowed) out.warnings.push_back("Too many XY columns to follow; top/bottom counts use part of the bed.");
}

MeasuredSettings ToolpathSettingsAnalyzer::result() const {
  MeasuredSettings out;
  summarise(out);
  out.analysedLayers = analysedLayers_;
  if (labelledWallMm_ > 0) {
    out.walls.detail += " Cross-check with the file's feature labels: " +
                        jsNumber(jsRound((labelledWallInLoopsMm_ / labelledWallMm_) * 100)) +
                        " % of wall-labelled extrusion lies in the loops counted as walls.";
  }
  if (labelledWallMm_ > 0) out.labelledWallAgreement = labelledWallInLoopsMm_ / labelledWallMm_;
  else out.labelledWallAgreement = std::nullopt;
  if (skippedLayers_ > 0) {
    const std::string note = " Large file: " + jsNumber(analysedLayers_) + " of " +
                             jsNumber(analysedLayers_ + skippedLayers_) + " layers analysed in full (windows of " +
                             jsNumber(SAMPLE_WINDOW_LAYERS) + ").";
    for (MeasuredFigure* f : {&out.walls, &out.top_layers, &out.bottom_layers, &out.infill_percent}) f->detail += note;
  }
  return out;
}

void ToolpathSettingsAnalyzer::toJson(Json& j) const {
  const MeasuredSettings r = result();
  auto num = [&j](double v) { j.num(v); };
  auto figure = [&](const char* name, const MeasuredFigure& f) {
    j.key(name).beginObject();
    j.key("value");
    if (f.value) num(*f.value);
    else j.null();
    j.key("detail").str(f.detail);
    j.endObject();
  };
  j.beginObject();
  figure("walls", r.walls);
  figure("top_layers", r.top_layers);
  figure("bottom_layers", r.bottom_layers);
  figure("infill_percent", r.infill_percent);
  figure("layer_height_mm", r.layer_height_mm);
  figure("first_layer_height_mm", r.first_layer_height_mm);
  figure("line_width_mm", r.line_width_mm);
  figure("nozzle_mm", r.nozzle_mm);
  j.key("layers");
  num(r.layers);
  j.key("infill_every_layers");
  num(r.infill_every_layers);
  j.key("analysedLayers");
  num(r.analysedLayers);
  j.key("labelledWallAgreement");
  if (r.labelledWallAgreement) num(*r.labelledWallAgreement);
  else j.null();
  j.key("warnings").beginArray();
  for (const auto& w : r.warnings) j.str(w);
  j.endArray();
  j.endObject();
}

}  // namespace hotlap
