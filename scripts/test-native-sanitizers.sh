#!/usr/bin/env bash
# The native engine under AddressSanitizer and UndefinedBehaviorSanitizer: builds the addon with
# both into a temp folder (build/ is left alone) and runs the engine tests that feed it real,
# crafted, fuzzed and broken input. Any sanitizer report fails the run.
set -euo pipefail
cd "$(dirname "$0")/.."
out="$(mktemp -d)"
trap 'rm -rf "$out"' EXIT
g++ -shared -fPIC -fsanitize=address,undefined -fno-sanitize-recover=undefined -O1 -g -std=c++17 \
  -ffp-contract=off -fexceptions -DNAPI_VERSION=8 -DNAPI_CPP_EXCEPTIONS \
  -I"$(node -p "require('path').dirname(process.execPath) + '/../include/node'")" \
  -I"$(node -p "require('node-addon-api').include_dir")" \
  lib/inspection/native/*.cc -o "$out/hotlap_inspection.node"
LD_PRELOAD="$(gcc -print-file-name=libasan.so) $(gcc -print-file-name=libubsan.so)" \
  ASAN_OPTIONS=detect_leaks=0:abort_on_error=1 HOTLAP_NATIVE_ADDON="$out/hotlap_inspection.node" HOTLAP_REQUIRE_NATIVE=1 \
  npx vitest run --project unit tests/unit/inspection/native.test.ts tests/unit/inspection/fuzz.test.ts tests/unit/inspection/badinput.test.ts
