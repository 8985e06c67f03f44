/** The preview JSON as the browser reads it: the engine's own types (lib/inspection/preview.ts, formats 2 and 3), without the build statistics. */
import type { PreviewLayer, ToolpathPreview } from '@/lib/inspection/preview';

export type { PreviewLayer };
export type Preview = Omit<ToolpathPreview, 'stats'>;
