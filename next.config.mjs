/** @type {import('next').NextConfig} */
const nextConfig = {
  // Separate build folders let several test runs share one checkout (see DEVELOPERS.md).
  distDir: process.env.NEXT_DIST_DIR || '.next',
  // The ORM and the native SQLite driver load dialect modules dynamically; bundling breaks that.
  // piscina starts its threads from its own worker.js, found relative to its installed files.
  serverExternalPackages: ['sequelize', 'sqlite3', 'nodemailer', 'formidable', 'bcryptjs', 'piscina'],
  poweredByHeader: false,
  // Type errors are checked once, by `npm run typecheck` (run by .ci/run), not again in every build.
  typescript: { ignoreBuildErrors: true },
  reactStrictMode: true,
  // forbidden() renders app/forbidden.tsx with HTTP 403 for signed-in users without the role.
  experimental: { authInterrupts: true },
};

export default nextConfig;
