/**
 * Links and return addresses that come from people (a sign-in callbackUrl, a link in a season's
 * Markdown) are resolved with the WHATWG URL parser — the one browsers use: it turns `\` into `/`,
 * drops tabs and newlines, understands `//host` and `javascript:` — and compared by origin, instead
 * of being checked by hand-written patterns. Client-safe (no server imports).
 */

/**
 * The same-origin path `raw` points to, or null when it leaves `origin`. The path never starts with
 * `//` (leading slashes are collapsed), so it cannot be read as another host when used as a link.
 */
export function sameOriginPath(raw: string | null | undefined, origin: string): string | null {
  if (!raw) return null;
  let url: URL;
  try {
    url = new URL(raw, origin);
  } catch {
    return null;
  }
  if (url.origin !== new URL(origin).origin) return null;
  return `${url.pathname.replace(/^\/+/, '/')}${url.search}${url.hash}`;
}

/** Where to go after signing in: a path on this site, else the home page. */
export const safeCallbackPath = (raw: string | null | undefined, origin: string) => sameOriginPath(raw, origin) ?? '/';

/** Any origin of ours that no other site can have, to tell relative links from off-site ones. */
const LOCAL = 'https://hotlap.invalid';

/**
 * A link target people may put in Markdown: http(s) and mailto as written, or a path on this site
 * (normalized). Everything else — `javascript:`, `data:`, `//host`, `/\host` — is null.
 */
export function safeLinkHref(raw: string): string | null {
  const href = raw.trim();
  if (/^(https?:\/\/|mailto:)/i.test(href)) {
    try {
      const u = new URL(href);
      return ['http:', 'https:', 'mailto:'].includes(u.protocol) ? u.href : null;
    } catch {
      return null;
    }
  }
  if (!href.startsWith('/') && !href.startsWith('#')) return null;
  return sameOriginPath(href, LOCAL);
}
