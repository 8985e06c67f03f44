/** Measures a test-piece STL on disk chunk by chunk (lib/stl), never holding the file in memory. */
import fs from 'node:fs';
import { parseStlStream, type StlSummary } from '@/lib/stl';
import { TEST_PIECE_MAX_BYTES } from '@/lib/seasons/schemas';

export async function measureStlFile(filePath: string): Promise<StlSummary> {
  const { size } = await fs.promises.stat(filePath);
  return parseStlStream(fs.createReadStream(filePath, { highWaterMark: 64 * 1024 }), { totalBytes: size, maxBytes: TEST_PIECE_MAX_BYTES });
}
