/** Standings: ranking, filters, sorting, paging, CSV, freezing, and the public read models. */
export * from './params';
export * from './query';
export { refreshCounts, type RefreshKind } from './changes';
export * from './freeze';
export * from './csv';
export * from './views';
export * from './overview';
export { inspectionSummary, flowSeriesPoints, type FlowSeries } from './summary';
