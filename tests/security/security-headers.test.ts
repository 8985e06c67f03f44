/**
 * Attack: framing Hotlap's pages (clickjacking) and injecting script; read back the headers the
 * running app sends, on pages, API answers and static files.
 */
import { describe, it, expect, inject } from 'vitest';

const base = inject('baseUrl');

const nonceOf = (csp: string | null) => csp?.match(/'nonce-([^']+)'/)?.[1];

describe('security headers', () => {
  it('attack: framing a page — refused by frame-ancestors and X-Frame-Options; the other headers are there too', async () => {
    for (const path of ['/', '/signin', '/seasons', '/me', '/api/v1/seasons', '/api/me']) {
      const res = await fetch(base + path, { redirect: 'manual' });
      const csp = res.headers.get('content-security-policy');
      expect(csp, path).toContain("frame-ancestors 'none'");
      if (path.startsWith('/api/')) expect(csp, path).toContain("default-src 'none'");
      else {
        expect(csp, path).toContain("object-src 'none'");
        expect(csp, path).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+' 'strict-dynamic'/);
      }
      expect(res.headers.get('x-frame-options'), path).toBe('DENY');
      expect(res.headers.get('x-content-type-options'), path).toBe('nosniff');
      expect(res.headers.get('referrer-policy'), path).toBe('strict-origin-when-cross-origin');
      expect(res.headers.get('permissions-policy'), path).toContain('camera=()');
      // Plain http here: no HSTS (it would pin a browser to https the server does not speak).
      expect(res.headers.get('strict-transport-security'), path).toBeNull();
    }
  });

  it('attack: injected script — every script tag of a page carries this response’s own nonce, which changes per request', async () => {
    const a = await fetch(`${base}/signin`);
    const b = await fetch(`${base}/signin`);
    const [na, nb] = [nonceOf(a.headers.get('content-security-policy')), nonceOf(b.headers.get('content-security-policy'))];
    expect(na).toBeTruthy();
    expect(na).not.toBe(nb);
    const html = await a.text();
    const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
    expect(scripts.length).toBeGreaterThan(0);
    for (const s of scripts) expect(s, s).toContain(`nonce="${na}"`);
  });

  it('static files carry the frame and sniffing headers too', async () => {
    const html = await (await fetch(`${base}/`)).text();
    const asset = html.match(/\/_next\/static\/[^"']+\.js/)![0];
    const res = await fetch(base + asset);
    expect(res.status).toBe(200);
    expect(res.headers.get('x-frame-options')).toBe('DENY');
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
  });

  it('HSTS is sent when a trusted proxy says the browser used https', async () => {
    const res = await fetch(`${base}/`, { headers: { 'x-forwarded-proto': 'https' } });
    expect(res.headers.get('strict-transport-security')).toMatch(/max-age=\d{7,}/);
  });
});
