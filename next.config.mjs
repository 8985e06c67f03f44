import fs from 'node:fs';

/** Security headers on every response, static files included; the CSP (per-request nonce) and HSTS come from proxy.ts. */
const SECURITY_HEADERS = [
  // No framing anywhere (clickjacking); frame-ancestors in the CSP says the same to newer browsers.
  { key: 'X-Frame-Options', value: 'DENY' },
  { key: 'X-Content-Type-Options', value: 'nosniff' },
  // Full address only to ourselves; other sites see the origin, and nothing when leaving https.
  { key: 'Referrer-Policy', value: 'strict-origin-when-cross-origin' },
  // Powerful features the app never uses stay off, for embedded content too.
  { key: 'Permissions-Policy', value: 'camera=(), microphone=(), geolocation=(), payment=(), usb=()' },
  { key: 'Cross-Origin-Opener-Policy', value: 'same-origin' },
];

/**
 * Allow headers for the API routes, from the one list of routes (lib/security/apiRoutes.json; the
 * route × role test keeps it equal to app/api). Next.js answers a method a route does not export
 * with 405; this header tells which ones it has (RFC 9110 §15.5.6). Same rule as allowHeader() in
 * lib/security/apiRoutes.ts: the route's methods, HEAD with GET, and OPTIONS.
 */
const API_ROUTES = JSON.parse(fs.readFileSync(new URL('./lib/security/apiRoutes.json', import.meta.url), 'utf8'));
const allowHeaders = API_ROUTES.map((r) => {
  const methods = new Set(Object.keys(r.methods));
  if (methods.has('GET')) methods.add('HEAD');
  methods.add('OPTIONS');
  // `[id]` → `:id`, `[...nextauth]` → `:nextauth*` (Next.js's path patterns for headers()).
  const source = r.path.replace(/\[\.\.\.(\w+)\]/g, ':$1*').replace(/\[(\w+)\]/g, ':$1');
  return { source, headers: [{ key: 'Allow', value: [...methods].sort().join(', ') }] };
});

/** @type {import('next').NextConfig} */
const nextConfig = {
  // Separate build folders let several test runs share one checkout (see DEVELOPERS.md).
  distDir: process.env.NEXT_DIST_DIR || '.next',
  // The ORM and the native SQLite driver load dialect modules dynamically; bundling breaks that.
  // piscina starts its threads from its own worker.js, found relative to its installed files.
  // pg-boss: the job queue on PostgreSQL (lib/jobs/bossQueue.ts), loaded as installed beside its driver.
  serverExternalPackages: ['sequelize', 'sqlite3', 'nodemailer', 'formidable', 'bcryptjs', 'rate-limiter-flexible', 'piscina', 'pg-boss'],
  poweredByHeader: false,
  // Type errors are checked once, by `npm run typecheck` (run by .ci/run), not again in every build.
  typescript: { ignoreBuildErrors: true },
  reactStrictMode: true,
  // forbidden() renders app/forbidden.tsx with HTTP 403 for signed-in users without the role.
  experimental: { authInterrupts: true },
  async headers() {
    return [
      { source: '/:path*', headers: SECURITY_HEADERS },
      // API answers are data, never documents to run: nothing may load or frame them. (Pages get
      // their policy with a per-request nonce from proxy.ts.)
      { source: '/api/:path*', headers: [{ key: 'Content-Security-Policy', value: "default-src 'none'; frame-ancestors 'none'" }] },
      ...allowHeaders,
    ];
  },
};

export default nextConfig;
