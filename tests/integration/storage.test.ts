/**
 * The running server keeps its files where the suite told it to (local disk, or the S3 fake with
 * HOTLAP_TEST_STORAGE=s3), read back from that storage itself, and a stored file is streamed
 * through the app under the access rule whichever the driver.
 */
import { describe, it, expect, inject } from 'vitest';
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { sql } from '../support/db';
import { testStorage } from '../support/storage';
import { dataDirOf } from '../support/server';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const dataDir = dataDirOf(dbFile);
const s3 = process.env.HOTLAP_TEST_STORAGE === 's3';

describe(`stored files (${s3 ? 'S3 fake' : 'local disk'})`, () => {
  it('the seeded test piece is in the storage the suite chose, and downloads byte for byte through the app', async () => {
    const [tp] = await sql<{ id: number; storage_key: string; sha256: string; size_bytes: number }>(
      dbFile, "SELECT f.id, f.storage_key, f.sha256, f.size_bytes FROM stored_files f JOIN test_pieces t ON t.stored_file_id = f.id JOIN seasons s ON s.id = t.season_id WHERE s.state <> 'draft' ORDER BY f.id LIMIT 1");
    expect(await testStorage(dataDir).stat(tp.storage_key)).toEqual({ sizeBytes: tp.size_bytes });
    // On S3 nothing was written to the server's data folder.
    expect(fs.existsSync(path.join(dataDir, 'uploads'))).toBe(!s3);
    const res = await fetch(`${base}/api/files/${tp.id}`);
    expect(res.status).toBe(200);
    expect(crypto.createHash('sha256').update(Buffer.from(await res.arrayBuffer())).digest('hex')).toBe(tp.sha256);
  });

  it('a file whose object is gone answers the same 404 sentence as any unreadable file', async () => {
    const [tp] = await sql<{ id: number; storage_key: string }>(dbFile, "SELECT f.id, f.storage_key FROM stored_files f JOIN test_pieces t ON t.stored_file_id = f.id JOIN seasons s ON s.id = t.season_id WHERE s.state <> 'draft' ORDER BY f.id DESC LIMIT 1");
    const store = testStorage(dataDir);
    const chunks: Buffer[] = [];
    for await (const c of await store.get(tp.storage_key)) chunks.push(c as Buffer);
    const bytes = Buffer.concat(chunks);
    await store.delete(tp.storage_key);
    try {
      const res = await fetch(`${base}/api/files/${tp.id}`);
      expect(res.status).toBe(404);
      expect((await res.json()).error).toBe('No such file.');
    } finally {
      await store.put(tp.storage_key, bytes);
    }
  });
});
