/**
 * The headers that change per request, set by proxy.ts: the Content-Security-Policy with a fresh
 * nonce, and HSTS when the request came over https. The static ones (X-Frame-Options,
 * Referrer-Policy, Permissions-Policy, …) are in next.config.mjs, which sets them on every
 * response, static files included.
 */

export const HSTS_VALUE = 'max-age=31536000; includeSubDomains';

/**
 * The policy for one response. Scripts: only those carrying this response's nonce ('strict-dynamic'
 * lets them load the app's chunks); Next.js puts the nonce on its own scripts when it finds it in
 * the request's CSP header. Styles allow inline because React `style` attributes (bars, charts)
 * cannot carry a nonce. `dev` adds 'unsafe-eval' that the development server's reloading needs.
 */
export function contentSecurityPolicy(nonce: string, dev = false): string {
  return [
    `default-src 'self'`,
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? ` 'unsafe-eval'` : ''}`,
    `style-src 'self' 'unsafe-inline'`,
    `img-src 'self' blob: data:`,
    `font-src 'self'`,
    `connect-src 'self'`,
    `worker-src 'self' blob:`,
    `object-src 'none'`,
    `base-uri 'self'`,
    `form-action 'self'`,
    `frame-ancestors 'none'`,
  ].join('; ');
}

/**
 * How many reverse proxies in front of the app are trusted (TRUST_PROXY=N): 0 unless N is a whole
 * number ≥ 1. The one reading of the setting, for the client address and for X-Forwarded-Proto.
 */
export function trustedProxyHops(): number {
  const hops = Number(process.env.TRUST_PROXY || 0);
  return Number.isInteger(hops) && hops >= 1 ? hops : 0;
}

/**
 * Whether the browser's request came over https: the first X-Forwarded-Proto value when a trusted
 * proxy terminates TLS (TRUST_PROXY), else the protocol the app saw ('https:' or 'http:'). Decides
 * HSTS, in proxy.ts and in the front layer alike.
 */
export function isHttpsRequest(forwardedProto: string | null, protocol: string): boolean {
  const forwarded = trustedProxyHops() ? forwardedProto?.split(',')[0].trim() : null;
  return (forwarded ?? protocol.replace(':', '')) === 'https';
}
