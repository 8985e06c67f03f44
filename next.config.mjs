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

/** @type {import('next').NextConfig} */
const nextConfig = {
  // Separate build folders let several test runs share one checkout (see DEVELOPERS.md).
  distDir: process.env.NEXT_DIST_DIR || '.next',
  // The ORM and the native SQLite driver load dialect modules dynamically; bundling breaks that.
  serverExternalPackages: ['sequelize', 'sqlite3', 'nodemailer', 'formidable', 'bcryptjs', 'rate-limiter-flexible'],
  poweredByHeader: false,
  // Type errors are checked once, by `npm run typecheck` (run by .ci/run), not again in every build.
  typescript: { ignoreBuildErrors: true },
  reactStrictMode: true,
  // forbidden() renders app/forbidden.tsx with HTTP 403 for signed-in users without the role.
  experimental: { authInterrupts: true },
  async headers() {
    return [{ source: '/:path*', headers: SECURITY_HEADERS }];
  },
};

export default nextConfig;
