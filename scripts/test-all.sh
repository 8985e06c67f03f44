#!/usr/bin/env bash
# The one test command (npm test): unit, integration and browser tests against a fresh build.
set -euo pipefail
cd "$(dirname "$0")/.."

if [ ! -x "${CHROMIUM_PATH:-/usr/bin/chromium}" ]; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    echo "Installing Debian's Chromium for the browser tests…"
    apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
  else
    echo "Browser tests need Chromium: run 'sudo apt-get install -y chromium' (or set CHROMIUM_PATH)." >&2
    exit 1
  fi
fi

# The integration suite runs a second time on PostgreSQL: the tests start their own throwaway
# cluster with Debian's initdb/pg_ctl (tests/support/postgres.ts).
if ! ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 && [ -z "${PG_BIN:-}" ]; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    echo "Installing Debian's PostgreSQL for the integration run on PostgreSQL…"
    apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null
  else
    echo "The PostgreSQL run needs PostgreSQL: run 'sudo apt-get install -y postgresql' (or set PG_BIN)." >&2
    exit 1
  fi
fi

[ -d node_modules ] || npm ci
# The compiled inspection engine (CLI, job worker, browser bundle): scripts/build-engine.mjs.
npm run build:engine
npx next build
npx vitest run
# The integration project again, on PostgreSQL with S3-compatible storage: every test server gets
# a fresh database on a throwaway cluster and its own prefix in a bucket of a local S3 fake
# (s3rver), both started by the global setup. More settings for this run: one line each.
HOTLAP_TEST_DB=postgres \
HOTLAP_TEST_STORAGE=s3 \
  npx vitest run --project integration
npx playwright test
