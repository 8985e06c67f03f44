/** Public entry points of the inspection engine (framework-free). */
export { inspectFile, inspectStream } from './inspect';
export { createInspector, DEFAULT_FILAMENT_DIAMETER_MM, type InspectOptions, type Inspector, type InspectorSource } from './engine';
export { toJsonReport, type EngineReport, type FeatureReport, type ReportSettings } from './report';
export { InspectionReportSchema, parseInspectionReport, parseStoredInspection, ReportContractError, type InspectionReport, type StoredInspectionJson } from './contract';
export { inspectFileToStore } from './inspect';
export { toStoredInspection, type StoredInspection } from './engine';
export { InspectionError, type InspectionErrorCode } from './lines';
export { MAX_LINE_BYTES } from './engineConstants';
export { GcodeParser, MachineState, featureFromLabel, type MotionSink, type ParserOptions, type ParserWarning } from './parser';
export { filamentAreaMm2 } from './materials';
export { Measurements, lineWidthMm, crossSectionMm2 } from './measure';
export { FEATURE_KINDS } from './types';
export { MotionPlanner, trapezoidTimeS, DEFAULT_LIMITS, type MachineLimits } from './planner';
export type { Segment, SegmentSink, FeatureKind, Flag, SettingsEvidence, Source, Sourced } from './types';
