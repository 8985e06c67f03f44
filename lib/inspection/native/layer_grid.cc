// Mirrors lib/inspection/toolpath/layerGrid.ts (LayerGrid). Same arithmetic in the same order;
// Float32Array volume cells are stored as float and read back as double.
#include "layer_grid.h"

#include <algorithm>
#include <cstring>

namespace hotlap {

namespace {
// Chamfer distance weights (3 for a side step, 4 for a diagonal; Borgefors 1986, "3-4 chamfer").
constexpr int kDSide = 3;
constexpr int kDDiag = 4;
}  // namespace

void LayerGrid::reset(double ox, double oy, double c, int nxArg, int nyArg) {
  originX = ox;
  originY = oy;
  cellMm = c;
  nx = nxArg;
  ny = nyArg;
  size_t n = (size_t)nx * (size_t)ny;
  if (label.size() < n) {
    label.assign(n, 0);
    volume.assign(n, 0.0f);
    dist.assign(n, 0);
    loopId.assign(n, 0);
    queue_.assign(n, 0);
  } else {
    // label.fill(0), volume.fill(0), loopId.fill(0) over the first n cells. memset: all-zero bytes
    // are 0 for uint8_t / int32_t and +0.0f for float (std::fill on float / int32 ran as a loop).
    std::memset(label.data(), 0, n * sizeof(uint8_t));
    std::memset(volume.data(), 0, n * sizeof(float));
    std::memset(loopId.data(), 0, n * sizeof(int32_t));
  }
}

void LayerGrid::paint(double x0, double y0, double x1, double y1, double rMm, double volumeMm3, int loopNo) {
  const bool loop = loopNo >= 0;
  const double c = cellMm;
  const double dx = x1 - x0;
  const double dy = y1 - y0;
  const double len = jsHypot(dx, dy);
  const uint8_t lab = loop ? kPaintLoop : kPaintOther;
  const double nxD = nx;
  const double nyD = ny;
  uint8_t* labp = label.data();
  float* volp = volume.data();
  int32_t* idp = loopId.data();
  // Volume samples at most one cell apart, at piece midpoints.
  const double nSamples = std::max(1.0, std::ceil(len / c));
  const double vPer = volumeMm3 / nSamples;
  for (double i = 0; i < nSamples; i++) {
    const double t = (i + 0.5) / nSamples;
    const double gx = std::floor((x0 + dx * t - originX) / c);
    const double gy = std::floor((y0 + dy * t - originY) / c);
    if (gx >= 0 && gy >= 0 && gx < nxD && gy < nyD) {
      size_t k = (size_t)gy * (size_t)nx + (size_t)gx;
      volp[k] = (float)((double)volp[k] + vPer);
    }
  }
  // Paint in pieces no longer than 4 radii so each piece's bounding box stays tight.
  const double pieces = std::max(1.0, std::ceil(len / std::max(4 * rMm, c)));
  const double r2 = rMm * rMm;
  for (double p = 0; p < pieces; p++) {
    const double ax = x0 + (dx * p) / pieces;
    const double ay = y0 + (dy * p) / pieces;
    const double bx = x0 + (dx * (p + 1)) / pieces;
    const double by = y0 + (dy * (p + 1)) / pieces;
    const double ex = bx - ax;
    const double ey = by - ay;
    const double l2 = ex * ex + ey * ey;
    const double fgx0 = jsMax(0, std::floor((std::min(ax, bx) - rMm - originX) / c));
    const double fgx1 = jsMin(nxD - 1, std::floor((std::max(ax, bx) + rMm - originX) / c));
    const double fgy0 = jsMax(0, std::floor((std::min(ay, by) - rMm - originY) / c));
    const double fgy1 = jsMin(nyD - 1, std::floor((std::max(ay, by) + rMm - originY) / c));
    if (!(fgx0 <= fgx1) || !(fgy0 <= fgy1)) continue;
    const int gx0 = (int)fgx0, gx1 = (int)fgx1, gy0 = (int)fgy0, gy1 = (int)fgy1;
    // Per column: cx = originX + (gx + 0.5)·c and (cx − ax)·ex; per row: cy and (cy − ay)·ey. The
    // TypeScript computes them per cell; each is a separately rounded double operation, so
    // computing them once and reusing them gives the same t, qx, qy.
    const int w = gx1 - gx0 + 1;
    if (colBuf_.size() < 2 * (size_t)w) colBuf_.resize(2 * (size_t)w + 64);
    double* colCx = colBuf_.data();
    double* colTx = colCx + w;
    for (int i = 0; i < w; i++) {
      const double cx = originX + (gx0 + i + 0.5) * c;
      colCx[i] = cx;
      colTx[i] = (cx - ax) * ex;
    }
    const bool l2pos = l2 > 0;
    for (int gy = gy0; gy <= gy1; gy++) {
      const double cy = originY + (gy + 0.5) * c;
      const double ty = (cy - ay) * ey;
      const size_t row = (size_t)gy * (size_t)nx + (size_t)gx0;
      for (int i = 0; i < w; i++) {
        // A cell already painted by this loop (or by any loop, for other paint) would not change.
        if (labp[row + i] == kPaintLoop && (!loop || idp[row + i] == loopNo + 1)) continue;
        const double cx = colCx[i];
        // t = l2 > 0 ? ((cx − ax)·ex + (cy − ay)·ey) / l2 : 0
        double t = l2pos ? (colTx[i] + ty) / l2 : 0;
        if (t < 0) t = 0;
        else if (t > 1) t = 1;
        const double qx = ax + ex * t - cx;
        const double qy = ay + ey * t - cy;
        if (qx * qx + qy * qy <= r2) {
          const size_t k = row + i;
          // A loop label wins over other paint: holes are recognised by their loop border.
          if (labp[k] != kPaintLoop) labp[k] = lab;
          if (loop) idp[k] = loopNo + 1;
        }
      }
    }
  }
}

void LayerGrid::classify(double holeMinThicknessMm) {
  const int nxL = nx;
  const int nyL = ny;
  uint8_t* lab = label.data();
  int32_t* q = queue_.data();
  const int32_t* ids = loopId.data();
  int qt = 0;
  for (int x = 0; x < nxL; x++) {
    lab[x] = kOutside;
    lab[(nyL - 1) * nxL + x] = kOutside;
  }
  for (int y = 0; y < nyL; y++) {
    lab[y * nxL] = kOutside;
    lab[y * nxL + nxL - 1] = kOutside;
  }
  // Seed from the second ring, then flood (4-connected).
  for (int x = 1; x < nxL - 1; x++) {
    const int a = nxL + x;
    const int b = (nyL - 2) * nxL + x;
    if (lab[a] == kCellEmpty) {
      lab[a] = kOutside;
      q[qt++] = a;
    }
    if (lab[b] == kCellEmpty) {
      lab[b] = kOutside;
      q[qt++] = b;
    }
  }
  for (int y = 2; y < nyL - 2; y++) {
    const int a = y * nxL + 1;
    const int b = y * nxL + nxL - 2;
    if (lab[a] == kCellEmpty) {
      lab[a] = kOutside;
      q[qt++] = a;
    }
    if (lab[b] == kCellEmpty) {
      lab[b] = kOutside;
      q[qt++] = b;
    }
  }
  int qh = 0;
  while (qh < qt) {
    const int k = q[qh++];
    int m = k - 1;
    if (lab[m] == kCellEmpty) {
      lab[m] = kOutside;
      q[qt++] = m;
    }
    m = k + 1;
    if (lab[m] == kCellEmpty) {
      lab[m] = kOutside;
      q[qt++] = m;
    }
    m = k - nxL;
    if (lab[m] == kCellEmpty) {
      lab[m] = kOutside;
      q[qt++] = m;
    }
    m = k + nxL;
    if (lab[m] == kCellEmpty) {
      lab[m] = kOutside;
      q[qt++] = m;
    }
  }
  // Remaining empty components: one flood each, then relabel.
  const uint8_t TMP = 250;
  const int end = (nyL - 1) * nxL;
  for (int s = nxL; s < end; s++) {
    // `if (lab[s] !== EMPTY) continue;` — jumps to the next empty cell with memchr (same cells).
    if (lab[s] != kCellEmpty) {
      const void* z = std::memchr(lab + s, kCellEmpty, (size_t)(end - s));
      if (z == nullptr) break;
      s = (int)(static_cast<const uint8_t*>(z) - lab);
    }
    qh = 0;
    qt = 0;
    lab[s] = TMP;
    q[qt++] = s;
    long long borderLoop = 0;
    long long borderOther = 0;
    // Majority vote (Boyer–Moore) over the loop numbers on the border.
    int32_t voteId = 0;
    long long vote = 0;
    // One neighbour m of the TypeScript `for (let d = 0; d < 4; d++)` loop body.
    auto visit = [&](int m) {
      const uint8_t l = lab[m];
      if (l == kCellEmpty) {
        lab[m] = TMP;
        q[qt++] = m;
      } else if (l == kPaintLoop) {
        borderLoop++;
        const int32_t id = ids[m];
        if (vote == 0) {
          voteId = id;
          vote = 1;
        } else if (id == voteId) vote++;
        else vote--;
      } else if (l == kPaintOther) borderOther++;
    };
    while (qh < qt) {
      const int k = q[qh++];
      // d = 0…3: k − 1, k + 1, k − nx, k + nx (unrolled, same order).
      visit(k - 1);
      visit(k + 1);
      visit(k - nxL);
      visit(k + nxL);
    }
    const double areaMm2 = (double)qt * cellMm * cellMm;
    const double borderMm = (double)(borderLoop + borderOther) * cellMm;
    const double thicknessMm = borderMm > 0 ? (2 * areaMm2) / borderMm : 0;
    // One loop must own ≥ 90 % of the loop border (vote ≥ 0.8 × border is equivalent).
    const bool isHole = thicknessMm >= holeMinThicknessMm &&
                        (double)borderLoop >= 0.85 * (double)(borderLoop + borderOther) &&
                        (double)vote >= 0.8 * (double)borderLoop;
    const uint8_t to = isHole ? kHole : kGap;
    for (int i = 0; i < qt; i++) lab[q[i]] = to;
  }
}

void LayerGrid::distanceTransform() {
  const int nxL = nx;
  const int nyL = ny;
  const uint8_t* lab = label.data();
  uint16_t* d_ = dist.data();
  const int BIG = 65000;
  // dist[k] = lab[k] === OUTSIDE || lab[k] === HOLE ? 0 : BIG for every cell. Done row by row inside
  // the forward pass below (each cell right before the pass reads it: same values, one sweep less):
  // the first row, then per row its two end cells and its interior, then the last row.
  // OUTSIDE and HOLE (3 and 4) are tested as one unsigned compare.
  static_assert(kHole == kOutside + 1, "OUTSIDE and HOLE are adjacent labels");
  auto init = [&](int k) { d_[k] = (uint8_t)(lab[k] - kOutside) < 2 ? 0 : BIG; };
  for (int k = 0; k < nxL; k++) init(k);
  // The outer ring is kOutside (0), so interior cells have all 8 neighbours in range.
  for (int y = 1; y < nyL - 1; y++) {
    init(y * nxL);
    init(y * nxL + nxL - 1);
    for (int k = y * nxL + 1, e = y * nxL + nxL - 1; k < e; k++) {
      // `let d = dist[k]; if (d === 0) continue;` with dist[k] initialised here.
      if ((uint8_t)(lab[k] - kOutside) < 2) {
        d_[k] = 0;
        continue;
      }
      int d = BIG;
      const int u = k - nxL;
      int t = d_[k - 1] + kDSide;
      if (t < d) d = t;
      t = d_[u] + kDSide;
      if (t < d) d = t;
      t = d_[u - 1] + kDDiag;
      if (t < d) d = t;
      t = d_[u + 1] + kDDiag;
      if (t < d) d = t;
      d_[k] = (uint16_t)d;
    }
  }
  if (nyL > 1)
    for (int k = (nyL - 1) * nxL; k < nyL * nxL; k++) init(k);
  for (int y = nyL - 2; y >= 1; y--) {
    for (int k = y * nxL + nxL - 2, e = y * nxL; k > e; k--) {
      int d = d_[k];
      if (d == 0) continue;
      const int b = k + nxL;
      int t = d_[k + 1] + kDSide;
      if (t < d) d = t;
      t = d_[b] + kDSide;
      if (t < d) d = t;
      t = d_[b + 1] + kDDiag;
      if (t < d) d = t;
      t = d_[b - 1] + kDDiag;
      if (t < d) d = t;
      d_[k] = (uint16_t)d;
    }
  }
}

void LayerGrid::blockStats(int k, double deepUnits, double* out) const {
  const int nxL = nx;
  const int nbx = nxL / k;
  const int nby = ny / k;
  const uint8_t* lab = label.data();
  const uint16_t* d_ = dist.data();
  const float* vol = volume.data();
  for (int by = 0; by < nby; by++) {
    for (int bx = 0; bx < nbx; bx++) {
      double fCells = 0;
      double dCells = 0;
      double dVol = 0;
      for (int yy = 0; yy < k; yy++) {
        int kk = (by * k + yy) * nxL + bx * k;
        for (int xx = 0; xx < k; xx++, kk++) {
          const uint8_t l = lab[kk];
          if (l == kOutside || l == kHole) continue;
          fCells++;
          if (d_[kk] > deepUnits) {
            dCells++;
            dVol += vol[kk];
          }
        }
      }
      const size_t o = ((size_t)by * nbx + bx) * 3;
      out[o] = fCells;
      out[o + 1] = dCells;
      out[o + 2] = dVol;
    }
  }
}

double LayerGrid::depthAtMm(double x, double y) const {
  const double gx = std::floor((x - originX) / cellMm);
  const double gy = std::floor((y - originY) / cellMm);
  if (!(gx >= 0) || !(gy >= 0) || !(gx < nx) || !(gy < ny)) {
    // NaN coordinates index nothing in TypeScript either (undefined → NaN, every test false).
    if (std::isnan(gx) || std::isnan(gy)) return NAN;
    return -1;
  }
  return ((double)dist[(size_t)gy * nx + (size_t)gx] / kDSide) * cellMm;
}

int LayerGrid::loopsCrossed(double x, double y, double dx, double dy, int selfLoop, double maxMm, int32_t* seen,
                            int seenLength, int maxCount) {
  const double c = cellMm;
  const double step = c * 0.5;
  const double nSteps = std::ceil(maxMm / step);
  int count = 0;
  int32_t last = selfLoop + 1;
  lastGapMm = maxMm;
  const double nxD = nx, nyD = ny;
  for (double i = 1; i <= nSteps; i++) {
    const double gx = std::floor((x + dx * step * i - originX) / c);
    const double gy = std::floor((y + dy * step * i - originY) / c);
    // Coordinates are bounded (±10 m) and finite by the analyzer, so gx, gy are never NaN here.
    if (std::isnan(gx) || std::isnan(gy)) return -1;
    const bool off = gx < 0 || gy < 0 || gx >= nxD || gy >= nyD;
    if (off) {
      if (count == 0) lastGapMm = step * i;
      return count;
    }
    const size_t k = (size_t)gy * nx + (size_t)gx;
    const uint8_t l = label[k];
    if (l == kOutside || l == kHole) {
      if (count == 0) lastGapMm = step * i;
      return count;
    }
    const int32_t id = loopId[k];
    if (id != 0 && id != last && id != selfLoop + 1) {
      if (count == 0) lastGapMm = step * i;
      bool known = false;
      for (int j = 0; j < count; j++)
        if (seen[j] == id) known = true;
      if (!known && count < seenLength) seen[count++] = id;
      last = id;
      // The caller only needs to know whether this way out is shorter than another.
      if (count > maxCount) return -1;
    }
  }
  return -1;
}

}  // namespace hotlap
