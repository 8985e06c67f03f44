/**
 * Our own colour scale for commanded volumetric flow, one colour per preview flow bucket
 * (PREVIEW_FLOW_BUCKETS_MM3S): pale to deep coolant teal up to 12 mm³/s (what a stock 0.4 mm hotend
 * sustains), a steel blue and an amber through 18 mm³/s, then ember oranges and alarm reds for flows
 * only high-flow hotends reach — the hot end of the scale reads as "check this" at a glance.
 */
export const FLOW_COLOURS = [
  '#b8ece0', '#8fdcca', '#5ec6b0', '#2fae96', '#159c86', '#0d7f6e',
  '#3e7c8c', '#c9a227', '#fd8034', '#f25f0e', '#d74707', '#b2340a',
  '#d33a3a', '#b52a2a', '#922424', '#5c1414',
] as const;

export function flowColour(bucket: number): string {
  return FLOW_COLOURS[Math.max(0, Math.min(FLOW_COLOURS.length - 1, bucket))];
}

/** "4–6" style label of a bucket from its lower edges, in mm³/s. */
export function bucketLabel(edges: readonly number[], i: number): string {
  return i + 1 < edges.length ? `${edges[i]}–${edges[i + 1]}` : `≥ ${edges[i]}`;
}

/**
 * The legend's bands: every band from the lowest to the highest one the file uses, so the scale has
 * no holes; a band in between with no extrusion is listed with 0 m.
 */
export function legendBands(lengthsMm: readonly number[]): { i: number; len: number }[] {
  const used = lengthsMm.map((len, i) => (len > 0 ? i : -1)).filter((i) => i >= 0);
  if (!used.length) return [];
  const out: { i: number; len: number }[] = [];
  for (let i = used[0]; i <= used[used.length - 1]; i++) out.push({ i, len: lengthsMm[i] ?? 0 });
  return out;
}

/**
 * The layer readout, numbered as the inspection report counts layers. The preview draws every Z
 * level with extrusion, which can include a prime line or purge the report does not count as a
 * layer; those levels say so instead of shifting every number by one ("Layer 101 / 201" against a
 * report of 200 layers).
 */
export function layerLabel(zMm: number, index: number, previewCount: number, report: { zMm: readonly number[]; count: number | null } | null): string {
  const total = report?.count ?? report?.zMm.length ?? 0;
  // No list, or a list the report cut short (very tall files): number the preview's own levels.
  if (!report?.zMm.length || report.zMm.length < total) return `Layer ${index + 1} / ${previewCount}`;
  // The report lists Z to 3 decimals; the preview keys Z to 1 µm.
  const k = report.zMm.findIndex((z) => Math.abs(z - zMm) < 0.0006);
  return k >= 0 ? `Layer ${k + 1} / ${total}` : `Not one of the ${total} counted layers (prime line or purge)`;
}
