/**
 * One layer's extrusion rasterised on a square grid, reused from layer to layer so memory stays at
 * one grid (capped at engineConstants.ts MAX_GRID_CELLS) however large the file.
 *
 * Cell labels after `classify()`:
 *   PAINT_LOOP / PAINT_OTHER — covered by an extrusion that is part of a closed loop / anything else,
 *   OUTSIDE — empty and connected to the grid border,
 *   HOLE — empty, enclosed, wide and bounded almost only by one loop (a hole through the part),
 *   GAP — empty but enclosed otherwise: the space between sparse-infill lines, inside the part.
 * The part's filled region F is every cell that is neither OUTSIDE nor HOLE.
 */

export const EMPTY = 0;
export const PAINT_LOOP = 1;
export const PAINT_OTHER = 2;
export const OUTSIDE = 3;
export const HOLE = 4;
export const GAP = 5;

/** Chamfer distance weights (3 for a side step, 4 for a diagonal; Borgefors 1986, "3-4 chamfer"). */
const D_SIDE = 3;
const D_DIAG = 4;

export class LayerGrid {
  nx = 0;
  ny = 0;
  originX = 0;
  originY = 0;
  cellMm = 1;
  label = new Uint8Array(0);
  /** Extruded volume dropped in each cell (mm³), sampled along each segment. */
  volume = new Float32Array(0);
  /** Chamfer distance to the nearest cell outside F, in units of cellMm / 3. */
  dist = new Uint16Array(0);
  /** Loop number + 1 of the closed loop painted last over each cell (0: none). */
  loopId = new Int32Array(0);
  /** Set by loopsCrossed(). */
  lastGapMm = 0;
  private queue = new Int32Array(0);

  reset(originX: number, originY: number, cellMm: number, nx: number, ny: number): void {
    this.originX = originX;
    this.originY = originY;
    this.cellMm = cellMm;
    this.nx = nx;
    this.ny = ny;
    const n = nx * ny;
    if (this.label.length < n) {
      this.label = new Uint8Array(n);
      this.volume = new Float32Array(n);
      this.dist = new Uint16Array(n);
      this.loopId = new Int32Array(n);
      this.queue = new Int32Array(n);
    } else {
      this.label.fill(0, 0, n);
      this.volume.fill(0, 0, n);
      this.loopId.fill(0, 0, n);
    }
  }

  /** Paint a capsule of radius rMm around the segment and drop its volume along it; loop ≥ 0 marks a closed loop's number. */
  paint(x0: number, y0: number, x1: number, y1: number, rMm: number, volumeMm3: number, loopNo: number): void {
    const loop = loopNo >= 0;
    const c = this.cellMm;
    const dx = x1 - x0;
    const dy = y1 - y0;
    const len = Math.hypot(dx, dy);
    const lab = loop ? PAINT_LOOP : PAINT_OTHER;
    const nx = this.nx;
    const ny = this.ny;
    // Volume samples at most one cell apart, at piece midpoints.
    const nSamples = Math.max(1, Math.ceil(len / c));
    const vPer = volumeMm3 / nSamples;
    for (let i = 0; i < nSamples; i++) {
      const t = (i + 0.5) / nSamples;
      const gx = Math.floor((x0 + dx * t - this.originX) / c);
      const gy = Math.floor((y0 + dy * t - this.originY) / c);
      if (gx >= 0 && gy >= 0 && gx < nx && gy < ny) this.volume[gy * nx + gx] += vPer;
    }
    // Paint in pieces no longer than 4 radii so each piece's bounding box stays tight.
    const pieces = Math.max(1, Math.ceil(len / Math.max(4 * rMm, c)));
    const r2 = rMm * rMm;
    for (let p = 0; p < pieces; p++) {
      const ax = x0 + (dx * p) / pieces;
      const ay = y0 + (dy * p) / pieces;
      const bx = x0 + (dx * (p + 1)) / pieces;
      const by = y0 + (dy * (p + 1)) / pieces;
      const ex = bx - ax;
      const ey = by - ay;
      const l2 = ex * ex + ey * ey;
      const gx0 = Math.max(0, Math.floor((Math.min(ax, bx) - rMm - this.originX) / c));
      const gx1 = Math.min(nx - 1, Math.floor((Math.max(ax, bx) + rMm - this.originX) / c));
      const gy0 = Math.max(0, Math.floor((Math.min(ay, by) - rMm - this.originY) / c));
      const gy1 = Math.min(ny - 1, Math.floor((Math.max(ay, by) + rMm - this.originY) / c));
      for (let gy = gy0; gy <= gy1; gy++) {
        const cy = this.originY + (gy + 0.5) * c;
        const row = gy * nx;
        for (let gx = gx0; gx <= gx1; gx++) {
          const cx = this.originX + (gx + 0.5) * c;
          let t = l2 > 0 ? ((cx - ax) * ex + (cy - ay) * ey) / l2 : 0;
          if (t < 0) t = 0;
          else if (t > 1) t = 1;
          const qx = ax + ex * t - cx;
          const qy = ay + ey * t - cy;
          if (qx * qx + qy * qy <= r2) {
            const k = row + gx;
            // A loop label wins over other paint: holes are recognised by their loop border.
            if (this.label[k] !== PAINT_LOOP) this.label[k] = lab;
            if (loop) this.loopId[k] = loopNo + 1;
          }
        }
      }
    }
  }

  /**
   * Label empty cells OUTSIDE / HOLE / GAP. A hole must be at least `holeMinThicknessMm` thick
   * (2 × area ÷ border length), have ≥ 85 % of its border on loop paint and that mostly of one loop:
   * sparse-infill gaps are bounded by infill lines, thin slivers between walls are too narrow.
   * The grid's outermost ring of cells is taken as outside (callers leave an empty margin), so the
   * floods below never need bounds checks.
   */
  classify(holeMinThicknessMm: number): { holes: number; gaps: number } {
    const nx = this.nx;
    const ny = this.ny;
    const lab = this.label;
    const q = this.queue;
    let qt = 0;
    for (let x = 0; x < nx; x++) {
      lab[x] = OUTSIDE;
      lab[(ny - 1) * nx + x] = OUTSIDE;
    }
    for (let y = 0; y < ny; y++) {
      lab[y * nx] = OUTSIDE;
      lab[y * nx + nx - 1] = OUTSIDE;
    }
    // Seed from the second ring, then flood (4-connected).
    for (let x = 1; x < nx - 1; x++) {
      const a = nx + x;
      const b = (ny - 2) * nx + x;
      if (lab[a] === EMPTY) {
        lab[a] = OUTSIDE;
        q[qt++] = a;
      }
      if (lab[b] === EMPTY) {
        lab[b] = OUTSIDE;
        q[qt++] = b;
      }
    }
    for (let y = 2; y < ny - 2; y++) {
      const a = y * nx + 1;
      const b = y * nx + nx - 2;
      if (lab[a] === EMPTY) {
        lab[a] = OUTSIDE;
        q[qt++] = a;
      }
      if (lab[b] === EMPTY) {
        lab[b] = OUTSIDE;
        q[qt++] = b;
      }
    }
    let qh = 0;
    while (qh < qt) {
      const k = q[qh++];
      let m = k - 1;
      if (lab[m] === EMPTY) {
        lab[m] = OUTSIDE;
        q[qt++] = m;
      }
      m = k + 1;
      if (lab[m] === EMPTY) {
        lab[m] = OUTSIDE;
        q[qt++] = m;
      }
      m = k - nx;
      if (lab[m] === EMPTY) {
        lab[m] = OUTSIDE;
        q[qt++] = m;
      }
      m = k + nx;
      if (lab[m] === EMPTY) {
        lab[m] = OUTSIDE;
        q[qt++] = m;
      }
    }
    // Remaining empty components: one flood each, then relabel.
    let holes = 0;
    let gaps = 0;
    const TMP = 250;
    const end = (ny - 1) * nx;
    for (let s = nx; s < end; s++) {
      if (lab[s] !== EMPTY) continue;
      qh = 0;
      qt = 0;
      lab[s] = TMP;
      q[qt++] = s;
      let borderLoop = 0;
      let borderOther = 0;
      // Majority vote (Boyer–Moore) over the loop numbers on the border.
      let voteId = 0;
      let vote = 0;
      const loopId = this.loopId;
      while (qh < qt) {
        const k = q[qh++];
        for (let d = 0; d < 4; d++) {
          const m = d === 0 ? k - 1 : d === 1 ? k + 1 : d === 2 ? k - nx : k + nx;
          const l = lab[m];
          if (l === EMPTY) {
            lab[m] = TMP;
            q[qt++] = m;
          } else if (l === PAINT_LOOP) {
            borderLoop++;
            const id = loopId[m];
            if (vote === 0) {
              voteId = id;
              vote = 1;
            } else if (id === voteId) vote++;
            else vote--;
          }
          else if (l === PAINT_OTHER) borderOther++;
        }
      }
      const areaMm2 = qt * this.cellMm * this.cellMm;
      const borderMm = (borderLoop + borderOther) * this.cellMm;
      const thicknessMm = borderMm > 0 ? (2 * areaMm2) / borderMm : 0;
      // One loop must own ≥ 90 % of the loop border (vote ≥ 0.8 × border is equivalent): a hole is
      // ringed by its own innermost wall, while the gaps of concentric infill or the ring inside a
      // skirt touch two loops.
      const isHole = thicknessMm >= holeMinThicknessMm && borderLoop >= 0.85 * (borderLoop + borderOther) && vote >= 0.8 * borderLoop;
      const to = isHole ? HOLE : GAP;
      if (isHole) holes++;
      else gaps++;
      for (let i = 0; i < qt; i++) lab[q[i]] = to;
    }
    return { holes, gaps };
  }

  /** Chamfer distance (3-4) from every cell to the nearest cell outside the filled region F. */
  distanceTransform(): void {
    const nx = this.nx;
    const ny = this.ny;
    const lab = this.label;
    const dist = this.dist;
    const BIG = 65000;
    for (let k = 0, n = nx * ny; k < n; k++) dist[k] = lab[k] === OUTSIDE || lab[k] === HOLE ? 0 : BIG;
    // The outer ring is OUTSIDE (0), so interior cells have all 8 neighbours in range.
    for (let y = 1; y < ny - 1; y++) {
      for (let k = y * nx + 1, e = y * nx + nx - 1; k < e; k++) {
        let d = dist[k];
        if (d === 0) continue;
        const u = k - nx;
        let t = dist[k - 1] + D_SIDE;
        if (t < d) d = t;
        t = dist[u] + D_SIDE;
        if (t < d) d = t;
        t = dist[u - 1] + D_DIAG;
        if (t < d) d = t;
        t = dist[u + 1] + D_DIAG;
        if (t < d) d = t;
        dist[k] = d;
      }
    }
    for (let y = ny - 2; y >= 1; y--) {
      for (let k = y * nx + nx - 2, e = y * nx; k > e; k--) {
        let d = dist[k];
        if (d === 0) continue;
        const b = k + nx;
        let t = dist[k + 1] + D_SIDE;
        if (t < d) d = t;
        t = dist[b] + D_SIDE;
        if (t < d) d = t;
        t = dist[b + 1] + D_DIAG;
        if (t < d) d = t;
        t = dist[b - 1] + D_DIAG;
        if (t < d) d = t;
        dist[k] = d;
      }
    }
  }

  /**
   * Per block of k × k cells: cells in F, cells deeper than deepUnits (chamfer units), and the
   * volume dropped in those deep cells. Writes 3 numbers per block into out (row-major blocks).
   */
  blockStats(k: number, deepUnits: number, out: Float64Array): void {
    const nx = this.nx;
    const nbx = Math.floor(nx / k);
    const nby = Math.floor(this.ny / k);
    const lab = this.label;
    const dist = this.dist;
    const vol = this.volume;
    for (let by = 0; by < nby; by++) {
      for (let bx = 0; bx < nbx; bx++) {
        let fCells = 0;
        let dCells = 0;
        let dVol = 0;
        for (let yy = 0; yy < k; yy++) {
          let kk = (by * k + yy) * nx + bx * k;
          for (let xx = 0; xx < k; xx++, kk++) {
            const l = lab[kk];
            if (l === OUTSIDE || l === HOLE) continue;
            fCells++;
            if (dist[kk] > deepUnits) {
              dCells++;
              dVol += vol[kk];
            }
          }
        }
        const o = (by * nbx + bx) * 3;
        out[o] = fCells;
        out[o + 1] = dCells;
        out[o + 2] = dVol;
      }
    }
  }

  /** Distance (mm) from the point to the outside of F, read from the cell it falls in; −1 off-grid. */
  depthAtMm(x: number, y: number): number {
    const gx = Math.floor((x - this.originX) / this.cellMm);
    const gy = Math.floor((y - this.originY) / this.cellMm);
    if (gx < 0 || gy < 0 || gx >= this.nx || gy >= this.ny) return -1;
    return (this.dist[gy * this.nx + gx] / D_SIDE) * this.cellMm;
  }

  /**
   * Walk from (x, y) along (dx, dy) (unit vector) until leaving the filled region F and count the
   * distinct loops crossed on the way, other than `selfLoop`. Returns −1 when F is not left within
   * maxMm (the walk went into the part instead of out of it). `lastGapMm` is set to the distance
   * walked before meeting the first other loop (or leaving F when none was crossed). Gives up
   * (−1) once more than maxCount loops are crossed.
   */
  loopsCrossed(x: number, y: number, dx: number, dy: number, selfLoop: number, maxMm: number, seen: Int32Array, maxCount = 1 << 30): number {
    const c = this.cellMm;
    const step = c * 0.5;
    const nSteps = Math.ceil(maxMm / step);
    let count = 0;
    let last = selfLoop + 1;
    this.lastGapMm = maxMm;
    for (let i = 1; i <= nSteps; i++) {
      const gx = Math.floor((x + dx * step * i - this.originX) / c);
      const gy = Math.floor((y + dy * step * i - this.originY) / c);
      const off = gx < 0 || gy < 0 || gx >= this.nx || gy >= this.ny;
      const l = off ? OUTSIDE : this.label[gy * this.nx + gx];
      if (l === OUTSIDE || l === HOLE) {
        if (count === 0) this.lastGapMm = step * i;
        return count;
      }
      const id = this.loopId[gy * this.nx + gx];
      if (id !== 0 && id !== last && id !== selfLoop + 1) {
        if (count === 0) this.lastGapMm = step * i;
        let known = false;
        for (let j = 0; j < count; j++) if (seen[j] === id) known = true;
        if (!known && count < seen.length) seen[count++] = id;
        last = id;
        // The caller only needs to know whether this way out is shorter than another.
        if (count > maxCount) return -1;
      }
    }
    return -1;
  }

  inF(k: number): boolean {
    const l = this.label[k];
    return l !== OUTSIDE && l !== HOLE;
  }
}
