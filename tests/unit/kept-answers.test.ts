/**
 * The gzip copies of kept answers (lib/standings/keptAnswers.ts): a page's parts are compressed
 * once and each answer puts its own nonce between them as stored blocks; the result must be one
 * valid gzip stream (RFC 1952, deflate RFC 1951) that zlib decodes to exactly the plain answer.
 */
import zlib from 'node:zlib';
import crypto from 'node:crypto';
import { describe, it, expect } from 'vitest';
import { acceptsGzip, gzipAnswer, gzipParts } from '@/lib/standings/keptAnswers';

describe('gzip copies of kept answers', () => {
  it('a body without a nonce is one gzip member', () => {
    const body = Buffer.from('{"rows":[1,2,3]}'.repeat(100));
    const gz = gzipParts([body]);
    expect(zlib.gunzipSync(gzipAnswer([body], gz, Buffer.alloc(0))).equals(body)).toBe(true);
  });

  it('a page split at its nonce decodes to the page with each answer’s own nonce', () => {
    const nonce = 'kwYku1ToZfYvbmdJs3o4Fw==';
    const page = `<html><script nonce="${nonce}">a()</script>${'<p>row</p>'.repeat(2000)}<script nonce="${nonce}"></script>${crypto.randomBytes(3000).toString('hex')}</html>`;
    const parts = page.split(nonce).map((p) => Buffer.from(p));
    expect(parts).toHaveLength(3);
    const gz = gzipParts(parts);
    for (let i = 0; i < 3; i++) {
      const fresh = crypto.randomBytes(16).toString('base64');
      const out = gzipAnswer(parts, gz, Buffer.from(fresh));
      expect(zlib.gunzipSync(out).toString()).toBe(page.replaceAll(nonce, fresh));
      expect(out.length).toBeLessThan(page.length / 2);
    }
    // Empty parts (a nonce at the very start or end) too.
    const edge = [Buffer.alloc(0), Buffer.from('x'.repeat(50)), Buffer.alloc(0)];
    expect(zlib.gunzipSync(gzipAnswer(edge, gzipParts(edge), Buffer.from('N'))).toString()).toBe(`N${'x'.repeat(50)}N`);
  });

  it('Accept-Encoding: gzip, x-gzip or * with q > 0 (RFC 9110 §12.5.3)', () => {
    expect(acceptsGzip('gzip, deflate, br')).toBe(true);
    expect(acceptsGzip('br;q=1.0, gzip;q=0.8')).toBe(true);
    expect(acceptsGzip('*')).toBe(true);
    expect(acceptsGzip('gzip;q=0')).toBe(false);
    expect(acceptsGzip('identity')).toBe(false);
    expect(acceptsGzip('br')).toBe(false);
    expect(acceptsGzip(undefined)).toBe(false);
  });
});
