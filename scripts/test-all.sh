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

[ -d node_modules ] || npm ci
# The compiled inspection engine (CLI, job worker, browser bundle): scripts/build-engine.mjs.
npm run build:engine
npx next build
npx vitest run
npx playwright test
