/**
 * One layer's extrusion rasterised on a square grid, reused from layer to layer so memory stays at
 * one grid (capped at MAX_GRID_CELLS) however large the file.
 *
 * Cell labels after `classify()`:
 *   PAINT_LOOP / PAINT_OTHER — covered by an extrusion that is part of a closed loop / anything else,
 *   OUTSIDE — empty and connected to the grid border,
 *   HOLE — empty, enclosed, wide and bounded almost only by loops (a hole through the part, the gap
 *          inside a skirt),
 *   GAP — empty but enclosed otherwise: the space between sparse-infill lines, inside the part.
 * The part's filled region F is every cell that is neither OUTSIDE nor HOLE.
 */

export const EMPTY = 0;
export const PAINT_LOOP = 1;
export const PAINT_OTHER = 2;
export const OUTSIDE = 3;
export const HOLE = 4;
export const GAP = 5;

/** Upper bound on grid cells (1024²): 1 MB of labels, 4 MB of volume, 2 MB of distance. */
export const MAX_GRID_CELLS = 1024 * 1024;

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
   * (2 × area ÷ border length) and have ≥ 85 % of its border on loop paint: sparse-infill gaps are
   * bounded by infill lines, thin slivers between walls are too narrow.
   */
  classify(holeMinThicknessMm: number): { holes: number; gaps: number } {
    const nx = this.nx;
    const ny = this.ny;
    const n = nx * ny;
    const lab = this.label;
    const q = this.queue;
    // Flood the outside from the border (4-connected).
    let qh = 0;
    let qt = 0;
    const seed = (k: number) => {
      if (lab[k] === EMPTY) {
        lab[k] = OUTSIDE;
        q[qt++] = k;
      }
    };
    for (let x = 0; x < nx; x++) {
      seed(x);
      seed((ny - 1) * nx + x);
    }
    for (let y = 0; y < ny; y++) {
      seed(y * nx);
      seed(y * nx + nx - 1);
    }
    while (qh < qt) {
      const k = q[qh++];
      const x = k % nx;
      if (x > 0) seed(k - 1);
      if (x < nx - 1) seed(k + 1);
      if (k >= nx) seed(k - nx);
      if (k < n - nx) seed(k + nx);
    }
    // Remaining empty components: one BFS each, then relabel.
    let holes = 0;
    let gaps = 0;
    const TMP = 250;
    for (let s = 0; s < n; s++) {
      if (lab[s] !== EMPTY) continue;
      qh = 0;
      qt = 0;
      lab[s] = TMP;
      q[qt++] = s;
      let borderLoop = 0;
      let borderOther = 0;
      while (qh < qt) {
        const k = q[qh++];
        const x = k % nx;
        for (let d = 0; d < 4; d++) {
          let m: number;
          if (d === 0) m = x > 0 ? k - 1 : -1;
          else if (d === 1) m = x < nx - 1 ? k + 1 : -1;
          else if (d === 2) m = k >= nx ? k - nx : -1;
          else m = k < n - nx ? k + nx : -1;
          if (m < 0) continue;
          const l = lab[m];
          if (l === EMPTY) {
            lab[m] = TMP;
            q[qt++] = m;
          } else if (l === PAINT_LOOP) borderLoop++;
          else if (l === PAINT_OTHER) borderOther++;
        }
      }
      const areaMm2 = qt * this.cellMm * this.cellMm;
      const borderMm = (borderLoop + borderOther) * this.cellMm;
      const thicknessMm = borderMm > 0 ? (2 * areaMm2) / borderMm : 0;
      const isHole = thicknessMm >= holeMinThicknessMm && borderLoop >= 0.85 * (borderLoop + borderOther);
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
    // Forward pass.
    for (let y = 0; y < ny; y++) {
      const row = y * nx;
      for (let x = 0; x < nx; x++) {
        const k = row + x;
        let d = dist[k];
        if (d === 0) continue;
        if (x > 0 && dist[k - 1] + D_SIDE < d) d = dist[k - 1] + D_SIDE;
        if (y > 0) {
          const u = k - nx;
          if (dist[u] + D_SIDE < d) d = dist[u] + D_SIDE;
          if (x > 0 && dist[u - 1] + D_DIAG < d) d = dist[u - 1] + D_DIAG;
          if (x < nx - 1 && dist[u + 1] + D_DIAG < d) d = dist[u + 1] + D_DIAG;
        }
        dist[k] = d;
      }
    }
    // Backward pass.
    for (let y = ny - 1; y >= 0; y--) {
      const row = y * nx;
      for (let x = nx - 1; x >= 0; x--) {
        const k = row + x;
        let d = dist[k];
        if (d === 0) continue;
        if (x < nx - 1 && dist[k + 1] + D_SIDE < d) d = dist[k + 1] + D_SIDE;
        if (y < ny - 1) {
          const b = k + nx;
          if (dist[b] + D_SIDE < d) d = dist[b] + D_SIDE;
          if (x < nx - 1 && dist[b + 1] + D_DIAG < d) d = dist[b + 1] + D_DIAG;
          if (x > 0 && dist[b - 1] + D_DIAG < d) d = dist[b - 1] + D_DIAG;
        }
        dist[k] = d;
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
   * maxMm (the walk went into the part instead of out of it).
   */
  loopsCrossed(x: number, y: number, dx: number, dy: number, selfLoop: number, maxMm: number, seen: Int32Array): number {
    const c = this.cellMm;
    const step = c * 0.5;
    const nSteps = Math.ceil(maxMm / step);
    let count = 0;
    let last = selfLoop + 1;
    for (let i = 1; i <= nSteps; i++) {
      const gx = Math.floor((x + dx * step * i - this.originX) / c);
      const gy = Math.floor((y + dy * step * i - this.originY) / c);
      if (gx < 0 || gy < 0 || gx >= this.nx || gy >= this.ny) return count;
      const k = gy * this.nx + gx;
      const l = this.label[k];
      if (l === OUTSIDE || l === HOLE) return count;
      const id = this.loopId[k];
      if (id !== 0 && id !== last && id !== selfLoop + 1) {
        let known = false;
        for (let j = 0; j < count; j++) if (seen[j] === id) known = true;
        if (!known && count < seen.length) seen[count++] = id;
        last = id;
      }
    }
    return -1;
  }

  inF(k: number): boolean {
    const l = this.label[k];
    return l !== OUTSIDE && l !== HOLE;
  }
}
