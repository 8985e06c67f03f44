/**
 * Compact per-layer storage for the toolpath-settings summary, so memory does not grow with one
 * object per layer.
 *
 * The summary needs two things from the layers:
 *  - the exact median of every layer's volume (to drop prime lines and wipes), hence one float64
 *    per layer — 8 bytes, at most 1.6 MB at the layer cap;
 *  - the figures of the layers that can enter a wall-count or infill estimate. Only layers that
 *    were rasterised and found walls or a sparse region can (a layer skipped by the work budget
 *    or abandoned keeps its defaults and fails every filter), and with the default work budget
 *    those are a few hundred of 100 000+ layers. They go in one float64 row each (exact: the
 *    counts are small integers), in order, so sums over them come out bit for bit as before.
 * Both arrays double when full.
 */

/** The figures of one layer the summary reads (a subset of the analyzer's per-layer record). */
export interface LayerFigures {
  z: number;
  h: number;
  volumeMm3: number;
  walls: number | null;
  firstOfSequence: boolean;
  innerLoops: number;
  sparseBlocks: number;
  solidBlocks: number;
  combinedLayers: number;
  sparseVolMm3: number;
  sparseAreaMm2: number;
  deepVolMm3: number;
  deepAreaMm2: number;
}

/** A stored layer with figures, as read back for the summary. */
export interface LayerRow extends LayerFigures {
  /** Position among the substantive layers (see mainRows). */
  mainIndex: number;
}

// Row layout (float64 each).
const R_INDEX = 0;
const R_Z = 1;
const R_H = 2;
const R_WALLS = 3; // NaN = null
const R_INNER = 4;
const R_SPARSE_BLOCKS = 5;
const R_SOLID_BLOCKS = 6;
const R_COMBINED = 7;
const R_SPARSE_VOL = 8;
const R_SPARSE_AREA = 9;
const R_DEEP_VOL = 10;
const R_DEEP_AREA = 11;
const STRIDE = 12;

/**
 * True when the layer can enter a summary filter: walls on a layer that is not the first of its
 * sequence, or a sparse region (≥ 1 block, ≥ 16 mm² deep) on such a layer. Must stay in step with
 * the filters in the summary.
 */
export function layerHasFigures(l: LayerFigures): boolean {
  if (l.firstOfSequence) return false;
  return (l.walls !== null && l.walls > 0) || (l.sparseBlocks >= 1 && l.deepAreaMm2 >= 16);
}

export class LayerTable {
  private volumes = new Float64Array(4096);
  private nLayers = 0;
  private rows = new Float64Array(STRIDE * 256);
  private nRows = 0;

  /** Layers stored. */
  get layers(): number {
    return this.nLayers;
  }

  /** Stores a layer's volume; returns its index. */
  addLayer(volumeMm3: number): number {
    if (this.nLayers === this.volumes.length) {
      const v = new Float64Array(this.volumes.length * 2);
      v.set(this.volumes);
      this.volumes = v;
    }
    this.volumes[this.nLayers] = volumeMm3;
    return this.nLayers++;
  }

  /** Stores the figures of the layer at `index` (from addLayer; indices must ascend). */
  addFigures(index: number, l: LayerFigures): void {
    if ((this.nRows + 1) * STRIDE > this.rows.length) {
      const r = new Float64Array(this.rows.length * 2);
      r.set(this.rows);
      this.rows = r;
    }
    const r = this.rows;
    const o = this.nRows * STRIDE;
    r[o + R_INDEX] = index;
    r[o + R_Z] = l.z;
    r[o + R_H] = l.h;
    r[o + R_WALLS] = l.walls === null ? Number.NaN : l.walls;
    r[o + R_INNER] = l.innerLoops;
    r[o + R_SPARSE_BLOCKS] = l.sparseBlocks;
    r[o + R_SOLID_BLOCKS] = l.solidBlocks;
    r[o + R_COMBINED] = l.combinedLayers;
    r[o + R_SPARSE_VOL] = l.sparseVolMm3;
    r[o + R_SPARSE_AREA] = l.sparseAreaMm2;
    r[o + R_DEEP_VOL] = l.deepVolMm3;
    r[o + R_DEEP_AREA] = l.deepAreaMm2;
    this.nRows++;
  }

  /** Median volume of all stored layers (mean of the middle two for an even count); 0 when none. */
  medianVolume(): number {
    const n = this.nLayers;
    if (n === 0) return 0;
    const s = this.volumes.slice(0, n).sort();
    const m = n >> 1;
    return n % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
  }

  /**
   * The substantive layers (volume ≥ minVolumeMm3): how many there are, and those of them with
   * figures, in layer order, each with its position among all substantive layers.
   */
  mainRows(minVolumeMm3: number): { count: number; rows: LayerRow[] } {
    const rows: LayerRow[] = [];
    const r = this.rows;
    let mainIndex = 0;
    let next = 0;
    for (let i = 0; i < this.nLayers; i++) {
      const vol = this.volumes[i];
      if (!(vol >= minVolumeMm3)) continue;
      while (next < this.nRows && r[next * STRIDE + R_INDEX] < i) next++;
      if (next < this.nRows && r[next * STRIDE + R_INDEX] === i) {
        const o = next * STRIDE;
        const walls = r[o + R_WALLS];
        rows.push({
          mainIndex,
          z: r[o + R_Z],
          h: r[o + R_H],
          volumeMm3: vol,
          walls: Number.isNaN(walls) ? null : walls,
          firstOfSequence: false,
          innerLoops: r[o + R_INNER],
          sparseBlocks: r[o + R_SPARSE_BLOCKS],
          solidBlocks: r[o + R_SOLID_BLOCKS],
          combinedLayers: r[o + R_COMBINED],
          sparseVolMm3: r[o + R_SPARSE_VOL],
          sparseAreaMm2: r[o + R_SPARSE_AREA],
          deepVolMm3: r[o + R_DEEP_VOL],
          deepAreaMm2: r[o + R_DEEP_AREA],
        });
      }
      mainIndex++;
    }
    return { count: mainIndex, rows };
  }
}
