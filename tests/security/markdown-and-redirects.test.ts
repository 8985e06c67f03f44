/**
 * Attacks through addresses people type: a season's Markdown linking off-site with `[x](/\host)`,
 * `javascript:` or raw HTML; and the sign-in callbackUrl sending the browser to another site
 * (`/signin?callbackUrl=/\host/x` went to `//host/x`).
 */
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, it, expect, inject } from 'vitest';
import { Markdown } from '@/components/organizer/Markdown';
import { safeCallbackPath, safeLinkHref } from '@/lib/security/urls';
import { Client } from '../support/client';
import { randomIp } from './support';
import { HOSTILE_CALLBACKS } from './hostileCallbacks';

const base = inject('baseUrl');
const render = (source: string) => renderToStaticMarkup(createElement(Markdown, { source }));
const hrefs = (html: string) => [...html.matchAll(/href="([^"]*)"/g)].map((m) => m[1]);


describe('links in Markdown', () => {
  it('attack: [x](/\\host) and friends are not rendered as links off the site', () => {
    for (const target of ['/\\evil.example/x', '//evil.example', 'javascript:alert(1)', 'data:text/html;base64,PHNjcmlwdD4=', '/\t/evil.example', 'vbscript:x']) {
      const html = render(`[x](${target})`);
      for (const h of hrefs(html)) {
        const u = new URL(h, 'https://hotlap.invalid');
        expect(['https://hotlap.invalid'].includes(u.origin) || ['http:', 'https:', 'mailto:'].includes(u.protocol), `${target} → ${h}`).toBe(true);
        expect(u.host, `${target} → ${h}`).not.toBe('evil.example');
      }
    }
  });

  it('attack: raw HTML and script in Markdown stay out of the page', () => {
    const html = render('Hi <script>alert(1)</script> <img src=x onerror=alert(1)> <iframe src="https://evil.example"></iframe>\n\n![p](https://evil.example/p.png)');
    expect(html).not.toMatch(/<script|<img|<iframe|onerror/i);
  });

  it('keeps the Markdown people use: headings, lists, emphasis, http(s) and same-site links', () => {
    const html = render('# Rules\n\nPrint **fast**, keep it *clean*.\n\n- one\n- two\n\n[video](https://video.example.org/run) and [safety](/safety)');
    expect(html).toContain('<h2 class="font-semibold">Rules</h2>');
    expect(html).toContain('<strong>fast</strong>');
    expect(html).toContain('<li>one</li>');
    expect(html).toContain('href="https://video.example.org/run"');
    expect(html).toContain('href="/safety"');
    expect(safeLinkHref('/safety')).toBe('/safety');
    expect(safeLinkHref('/\\evil.example')).toBeNull();
  });
});

describe('sign-in return address', () => {
  it('attack: every hostile callbackUrl resolves to a path on this site', () => {
    const origin = 'http://127.0.0.1:3000';
    for (const raw of HOSTILE_CALLBACKS) {
      const path = safeCallbackPath(raw, origin);
      expect(path.startsWith('/') && !path.startsWith('//'), `${JSON.stringify(raw)} → ${path}`).toBe(true);
      expect(new URL(path, origin).origin, raw).toBe(origin);
    }
    expect(safeCallbackPath('/me/entries?x=1#a', origin)).toBe('/me/entries?x=1#a');
    expect(safeCallbackPath(`${origin}/judging`, origin)).toBe('/judging');
  });

  it("attack: next-auth's own redirect — a sign-in posted with a hostile callbackUrl answers a URL on this site", async () => {
    const c = new Client(base, randomIp());
    const { csrfToken } = await (await c.get('/api/auth/csrf')).json();
    for (const callbackUrl of HOSTILE_CALLBACKS.slice(0, 6)) {
      const res = await c.request('/api/auth/callback/credentials', {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded' },
        body: new URLSearchParams({ email: 'nobody@example.org', password: 'x', csrfToken, json: 'true', callbackUrl }).toString(),
      });
      const { url } = await res.json();
      expect(new URL(url).origin, callbackUrl).toBe(new URL(base).origin);
    }
  });
});
