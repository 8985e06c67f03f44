/**
 * Our own colour scale for commanded volumetric flow, one colour per preview flow bucket
 * (PREVIEW_FLOW_BUCKETS_MM3S). It runs from the palette's coolant teal (gentle flow) through ink
 * blue-greys and ember oranges to alarm red (flows only high-flow hotends sustain), so the hot end of
 * the scale reads as "check this" at a glance. Lightness falls steadily, so it also reads in grey.
 */
export const FLOW_COLOURS = [
  '#9fe3d4', '#6fd0bc', '#3fb9a2', '#159c86', '#0d7f6e', '#3e7c8c',
  '#5f6f7d', '#a07a4a', '#fd8034', '#f25f0e', '#d74707', '#b2340a',
  '#d33a3a', '#b52a2a', '#922424', '#5c1414',
] as const;

export function flowColour(bucket: number): string {
  return FLOW_COLOURS[Math.max(0, Math.min(FLOW_COLOURS.length - 1, bucket))];
}

/** "4–6" style label of a bucket from its lower edges, in mm³/s. */
export function bucketLabel(edges: readonly number[], i: number): string {
  return i + 1 < edges.length ? `${edges[i]}–${edges[i + 1]}` : `≥ ${edges[i]}`;
}
