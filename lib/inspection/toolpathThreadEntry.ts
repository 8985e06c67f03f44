/** Entry of the toolpath-settings thread bundle (.hotlap/engine/toolpath-thread.cjs): see toolpathThread.ts. */
import { runToolpathThread } from './toolpathThread';

runToolpathThread();
