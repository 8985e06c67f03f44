import { describe, it, expect } from 'vitest';
import crypto from 'node:crypto';
import fs from 'node:fs';
import { receiveUpload, type UploadSpec } from '@/lib/uploads';
import { sniffBytes } from '@/lib/uploads/sniff';
import { HttpError } from '@/lib/errors';

const spec: UploadSpec = {
  files: { gcode: { maxBytes: 1000, maxCount: 1, required: true, label: 'the G-code' }, photo: { maxBytes: 500, maxCount: 2, label: 'photos' } },
  fields: ['note'],
  maxTotalBytes: 2000,
};

function multipart(parts: [string, Blob | string, string?][]) {
  const fd = new FormData();
  for (const [k, v, name] of parts) typeof v === 'string' ? fd.append(k, v) : fd.append(k, v, name);
  return new Request('http://x/upload', { method: 'POST', body: fd });
}

async function refusal(p: Promise<unknown>): Promise<HttpError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof HttpError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

describe('receiveUpload', () => {
  it('streams files to disk with their SHA-256 and keeps declared text fields', async () => {
    const body = 'G1 X10 Y10 E1\n'.repeat(20);
    const res = await receiveUpload(multipart([['gcode', new Blob([body]), 'run.gcode'], ['note', 'hello'], ['sneaky', 'x']]), spec);
    const f = res.files.gcode[0];
    expect(f.originalName).toBe('run.gcode');
    expect(f.sizeBytes).toBe(body.length);
    expect(f.sha256).toBe(crypto.createHash('sha256').update(body).digest('hex'));
    expect(fs.readFileSync(f.tmpPath, 'utf8')).toBe(body);
    expect(res.fields).toEqual({ note: 'hello' });
    await res.cleanup();
    expect(fs.existsSync(f.tmpPath)).toBe(false);
  });

  it('refuses early by declared length with 413', async () => {
    const req = new Request('http://x/upload', { method: 'POST', headers: { 'content-type': 'multipart/form-data; boundary=x', 'content-length': String(2 * 1024 ** 3) }, body: 'x' });
    const e = await refusal(receiveUpload(req, spec));
    expect(e.status).toBe(413);
    expect(e.message).toMatch(/2048 MB; the limit is 0 MB/);
  });

  it('refuses a file over its field limit with 413 and a field message', async () => {
    const e = await refusal(receiveUpload(multipart([['gcode', new Blob(['x']), 'a.gcode'], ['photo', new Blob([new Uint8Array(800)]), 'big.jpg']]), spec));
    expect(e.status).toBe(413);
    expect(e.fields?.photo).toMatch(/limit for photos is/);
  });

  it('refuses too many files for a field', async () => {
    const e = await refusal(receiveUpload(multipart([['gcode', new Blob(['a']), 'a.gcode'], ['gcode', new Blob(['b']), 'b.gcode']]), spec));
    expect(e.status).toBe(413);
    expect(e.message).toMatch(/At most 1 file for the G-code/);
  });

  it('asks for a required file', async () => {
    const e = await refusal(receiveUpload(multipart([['note', 'only text']]), spec));
    expect(e.status).toBe(400);
    expect(e.fields?.gcode).toBe('Add the G-code.');
  });

  it('refuses a body that is not multipart', async () => {
    const e = await refusal(receiveUpload(new Request('http://x', { method: 'POST', body: '{}', headers: { 'content-type': 'application/json' } }), spec));
    expect(e.status).toBe(415);
  });
});

describe('sniffBytes (magic numbers from the format specifications named in lib/uploads/sniff.ts)', () => {
  it('recognises images, gzip, binary G-code and text', () => {
    expect(sniffBytes(Uint8Array.from([0xff, 0xd8, 0xff, 0xe0, 0, 0x10]))).toBe('jpeg');
    expect(sniffBytes(Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))).toBe('png');
    expect(sniffBytes(new TextEncoder().encode('RIFF\u0000\u0000\u0000\u0000WEBPVP8 '))).toBe('webp');
    expect(sniffBytes(new TextEncoder().encode('\u0000\u0000\u0000\u0018ftypheic\u0000\u0000'))).toBe('heic');
    expect(sniffBytes(Uint8Array.from([0x1f, 0x8b, 8, 0]))).toBe('gzip');
    expect(sniffBytes(new TextEncoder().encode('GCDE\u0001\u0000'))).toBe('bgcode');
    expect(sniffBytes(new TextEncoder().encode('; generated\nG1 X1 Y2\r\n'))).toBe('text');
    expect(sniffBytes(Uint8Array.from([1, 2, 3, 0, 200]))).toBe('binary');
  });

  it('recognises a binary STL by its exact size (84 + 50·n bytes)', () => {
    const buf = new Uint8Array(84 + 50 * 2);
    new DataView(buf.buffer).setUint32(80, 2, true);
    expect(sniffBytes(buf, buf.length)).toBe('stl-binary');
  });
});

describe('receiveUpload order', () => {
  it('lists the files of a field in the order they were sent', async () => {
    const many: UploadSpec = { files: { photo: { maxBytes: 1_000_000, maxCount: 6, label: 'photos' } }, maxTotalBytes: 10_000_000 };
    // A big first file finishes writing after the small ones.
    const res = await receiveUpload(multipart([['photo', new Blob([new Uint8Array(900_000)]), 'first.jpg'], ['photo', new Blob(['b']), 'second.jpg'], ['photo', new Blob(['c']), 'third.jpg']]), many);
    expect(res.files.photo.map((f) => f.originalName)).toEqual(['first.jpg', 'second.jpg', 'third.jpg']);
    await res.cleanup();
  });
});
