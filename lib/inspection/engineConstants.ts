/**
 * The engine's caps, bins and tunables: this module is their one definition. Only numbers (and
 * arrays of numbers) belong here.
 */

// Reader and parser (reader.ts, parser.ts).

/** Longest line kept; the rest of a longer line is dropped with a warning. */
export const MAX_LINE_BYTES = 64 * 1024;
/** Largest sane coordinate magnitude, mm; beyond it a word is rejected as absurd. */
export const PARSER_MAX_COORD_MM = 1e5;
/** Largest sane extruder position, mm. */
export const MAX_E_MM = 1e8;
/** Fastest sane feed, mm/min. */
export const MAX_FEED_MM_MIN = 1e6;
/** Slowest usable feed, mm/min; anything slower is treated as a typo (and would overflow times). */
export const MIN_FEED_MM_MIN = 0.01;
/** Largest sane machine limit (accelerations, mm/s²). */
export const MAX_LIMIT = 1e7;
/** Smallest usable acceleration, mm/s². */
export const MIN_ACCEL = 1;
/** Smallest usable max-feed limit, mm/s. */
export const MIN_FEED_LIMIT_MMS = 0.01;
/** Most chords one arc may be split into (bounds work on absurd radii). */
export const MAX_ARC_CHORDS = 10000;
/** Tools tracked (T0 … T15); a higher tool number is ignored with a warning. */
export const MAX_TOOLS = 16;

// Measurements (measure.ts).

/** Flow histogram: fixed bins of 0.05 mm³/s up to 250 mm³/s plus one overflow bin. */
export const FLOW_BIN_MM3S = 0.05;
export const FLOW_BINS = 5000;
/** Chart time series: at most this many buckets; the bucket length doubles as the print runs longer. */
export const TIME_SERIES_POINTS = 600;
/** Objects grid: 1 mm cells over ±1024 mm. */
export const GRID_CELL_MM = 1;
export const GRID_N = 2048;
export const GRID_ORIGIN_MM = -1024;
/**
 * Per-layer records kept (z, height, time, volume, and a Z→layer map for revisits). 20 000 layers is
 * a 4 m tall part at 0.2 mm, far beyond any test piece; past it layers are only counted, so memory
 * stays flat on absurdly tall (or artificially stacked) files.
 */
export const MEASURE_MAX_LAYERS = 20000;
/** Line-width histogram: 0.005 mm bins up to 5 mm. */
export const WIDTH_BIN_MM = 0.005;
export const WIDTH_BINS = 1000;
/** Z keys per mm: Z values closer than 1 / this (mm) are the same layer. */
export const Z_KEY_PER_MM = 1000;

// Time planner (planner.ts).

/** Moves in the look-ahead window; 128 is in the range firmware uses (Marlin BLOCK_BUFFER_SIZE 16–64, Klipper ~2 s). */
export const PLANNER_RING = 128;

// Toolpath settings (toolpathSettings.ts, toolpath/*.ts).

/** Nozzle sizes sold for FFF printers, for snapping the width-based estimate (common practice, no source). */
export const STANDARD_NOZZLES_MM = [0.2, 0.25, 0.3, 0.4, 0.5, 0.6, 0.8, 1.0, 1.2] as const;
/** A block counts as solid at ≥ 75 % volume fraction (solid infill is ~100 %, contest sparse ≤ 50 %). */
export const SOLID_FRACTION = 0.75;
/** Most segments kept for one layer (5 floats each); beyond this the layer is analysed in part. */
export const MAX_LAYER_SEGMENTS = 400_000;
/** Most layer records the toolpath analysis keeps. */
export const TOOLPATH_MAX_LAYERS = 200_000;
/** Extrusion at Z values closer than this (mm) is one layer. */
export const Z_EPS_MM = 0.0015;
/** Coordinates beyond ±10 m are not a printer's (bad input); such moves are ignored by the toolpath analysis. */
export const TOOLPATH_MAX_COORD_MM = 10_000;
/**
 * Grid cells across one line width. The fixtures and a sweep of 33 further slices give the same
 * figures at 1.6 and 2 (cell ≈ 0.28 mm for 0.45 mm lines); 1.6 costs 36 % fewer cells.
 */
export const CELLS_PER_WIDTH = 1.6;
/**
 * Default work budget: 6 M cells (~0.3 s of CPU in TypeScript) covers the 36 × 39 × 40 mm Beacon in
 * full at 0.2 mm layers (4.7 M cells); a quarter cell per extruding move keeps large files near
 * parser speed. Callers wanting every layer analysed pass Infinity.
 */
export const DEFAULT_BUDGET_BASE_CELLS = 6_000_000;
export const DEFAULT_BUDGET_CELLS_PER_SEGMENT = 0.25;
/** Consecutive layers analysed per window once sampling. */
export const SAMPLE_WINDOW_LAYERS = 24;
/** Upper bound on the cells of one layer's grid (1024²): 1 MB of labels, 4 MB of volume, 2 MB of distance. */
export const MAX_GRID_CELLS = 1024 * 1024;
/** Longest run of empty layers read as combined infill (a slicer combines at most ~10 layers). */
export const MAX_INFILL_GAP = 9;
/** Cap on tracked columns (a 400 × 400 mm bed at 2 mm blocks is 40 000). */
export const MAX_COLUMNS = 250_000;
