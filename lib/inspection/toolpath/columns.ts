/**
 * Vertical columns of fixed XY blocks, followed layer by layer, to count solid layers over every
 * bottom surface (bed or overhang) and under every top surface.
 *
 * A block's state per layer: EMPTY (outside the part), SOLID or SPARSE (fully inside the infill
 * region, by its volume fraction), or EDGE (partly walls, partly outside — says nothing).
 *  - A run of SOLID that starts over EMPTY (bed, air) and ends at SPARSE is a bottom-layer count.
 *  - A run of SOLID that starts over SPARSE and ends at EMPTY (nothing above) is a top-layer count.
 *  - Runs touching EDGE, or solid all the way through (a thin plate), prove nothing and are dropped.
 */

export const B_EMPTY = 0;
export const B_SOLID = 1;
export const B_SPARSE = 2;
export const B_EDGE = 3;

const FROM_AIR = 1;
const FROM_SPARSE = 2;
const FROM_OTHER = 3;

interface Column {
  state: number;
  lastLayer: number;
  run: number;
  from: number;
}

/** Cap on tracked columns (a 400 × 400 mm bed at 2 mm blocks is 40 000). */
const MAX_COLUMNS = 250_000;

export class ColumnTracker {
  private cols = new Map<number, Column>();
  readonly bottomRuns = new Map<number, number>();
  readonly topRuns = new Map<number, number>();
  private layer = -1;
  overflowed = false;

  static key(bx: number, by: number): number {
    return (bx + 1_048_576) * 2_097_152 + (by + 1_048_576);
  }

  /** Start a new layer; blocks not set during the layer count as EMPTY. */
  beginLayer(): void {
    this.layer++;
  }

  set(key: number, state: number): void {
    let c = this.cols.get(key);
    if (!c) {
      if (state === B_EMPTY) return;
      if (this.cols.size >= MAX_COLUMNS) {
        this.overflowed = true;
        return;
      }
      c = { state: B_EMPTY, lastLayer: this.layer - 1, run: 0, from: FROM_OTHER };
      this.cols.set(key, c);
    }
    const prev = c.lastLayer === this.layer - 1 ? c.state : B_EMPTY;
    this.transition(c, prev, state);
    c.state = state;
    c.lastLayer = this.layer;
  }

  /** Close the layer: columns that had material last layer and none now went EMPTY. */
  endLayer(): void {
    for (const [k, c] of this.cols) {
      if (c.lastLayer === this.layer) continue;
      if (c.lastLayer === this.layer - 1) {
        this.transition(c, c.state, B_EMPTY);
        c.state = B_EMPTY;
        c.lastLayer = this.layer;
      } else this.cols.delete(k);
    }
  }

  /** End of a sequence of layers (end of file, or Z went back down): everything above is air. */
  finish(): void {
    for (const c of this.cols.values()) {
      if (c.lastLayer === this.layer) this.transition(c, c.state, B_EMPTY);
    }
    this.cols.clear();
  }

  /** A layer was not analysed: runs in progress cannot be counted; forget them. */
  abandon(): void {
    this.layer++;
    this.cols.clear();
  }

  private transition(c: Column, prev: number, next: number): void {
    if (next === B_SOLID) {
      if (prev === B_SOLID) c.run++;
      else {
        c.run = 1;
        c.from = prev === B_EMPTY ? FROM_AIR : prev === B_SPARSE ? FROM_SPARSE : FROM_OTHER;
      }
      return;
    }
    if (prev === B_SOLID) {
      if (next === B_SPARSE && c.from === FROM_AIR) add(this.bottomRuns, c.run);
      else if (next === B_EMPTY && c.from === FROM_SPARSE) add(this.topRuns, c.run);
    }
    c.run = 0;
  }
}

function add(m: Map<number, number>, v: number): void {
  m.set(v, (m.get(v) ?? 0) + 1);
}
