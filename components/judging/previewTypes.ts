/** The preview JSON as the browser reads it (lib/inspection/preview.ts, formats 2 and 3). */
export interface PreviewLayer { zMm: number; paths: number[]; extrudedMm: number; peakFlowMm3s: number; props?: number[]; heightMm?: number }
export interface Preview {
  version: number;
  unitMm: number;
  toleranceMm: number;
  originMm: { x: number; y: number };
  sizeUnits: { x: number; y: number };
  focusUnits: { x0: number; y0: number; x1: number; y1: number };
  flowBucketsMm3s: number[];
  bucketLengthMm: number[];
  layers: PreviewLayer[];
  warnings: string[];
}
