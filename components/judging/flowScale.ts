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
