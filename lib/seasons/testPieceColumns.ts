/**
 * The test_pieces columns an STL's measurement fills, shared by the organizer's upload
 * (lib/seasons/testPiece.ts) and the demo seed. Its own module so the seed script does not load
 * the upload path's auth guard and storage.
 */
import type { StlSummary } from '@/lib/stl';

export function testPieceColumns(stl: StlSummary) {
  return {
    format: stl.format,
    triangleCount: stl.triangleCount,
    sizeXMm: stl.sizeMm.x,
    sizeYMm: stl.sizeMm.y,
    sizeZMm: stl.sizeMm.z,
    volumeMm3: stl.volumeMm3,
  };
}
