/**
 * lib/http.ts checkOrigin, the cases the browser-level tests (tests/security/cross-site-requests)
 * do not send: an opaque origin, a sibling site without Origin, and safe methods.
 * Header semantics: Fetch standard (Origin serialisation, "null" for opaque origins) and W3C Fetch
 * Metadata Request Headers (Sec-Fetch-Site values).
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { checkOrigin } from '@/lib/http';
import { HttpError } from '@/lib/errors';

const APP = 'http://app.example.test:3000';
let saved: string | undefined;
beforeAll(() => {
  saved = process.env.APP_URL;
  process.env.APP_URL = APP;
});
afterAll(() => {
  if (saved === undefined) delete process.env.APP_URL;
  else process.env.APP_URL = saved;
});

const req = (method: string, headers: Record<string, string>) => new Request(`${APP}/api/account/sessions`, { method, headers });
function refusal(r: Request): number | null {
  try {
    checkOrigin(r);
    return null;
  } catch (e) {
    expect(e).toBeInstanceOf(HttpError);
    return (e as HttpError).status;
  }
}

describe('checkOrigin', () => {
  it('attack: an opaque origin ("null": sandboxed frame, data: page) is refused', () => {
    expect(refusal(req('DELETE', { origin: 'null', host: 'app.example.test:3000' }))).toBe(403);
  });

  it('attack: the same host on another port, or another scheme, is another origin', () => {
    expect(refusal(req('POST', { origin: 'http://app.example.test:4000', host: 'app.example.test:3000' }))).toBe(403);
    expect(refusal(req('POST', { origin: 'https://app.example.test:3000', host: 'app.example.test:4000' }))).toBe(403);
  });

  it('attack: a sibling site without Origin (Sec-Fetch-Site: same-site or cross-site) is refused', () => {
    expect(refusal(req('POST', { 'sec-fetch-site': 'same-site' }))).toBe(403);
    expect(refusal(req('PATCH', { 'sec-fetch-site': 'cross-site' }))).toBe(403);
  });

  it('the app origin, the host the visitor used, same-origin fetch metadata and non-browser clients pass', () => {
    expect(refusal(req('POST', { origin: APP }))).toBeNull();
    expect(refusal(req('POST', { origin: 'http://127.0.0.1:3000', host: '127.0.0.1:3000' }))).toBeNull();
    expect(refusal(req('DELETE', { 'sec-fetch-site': 'same-origin' }))).toBeNull();
    expect(refusal(req('DELETE', {}))).toBeNull();
  });

  it('safe methods are not checked (they change nothing)', () => {
    expect(refusal(req('GET', { origin: 'https://elsewhere.example.test' }))).toBeNull();
    expect(refusal(req('HEAD', { 'sec-fetch-site': 'cross-site' }))).toBeNull();
  });
});
