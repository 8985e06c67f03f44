# Native twin of the inspection engine's per-move work (lib/inspection/native/; DEVELOPERS.md, "Native engine").
# Built by `npm install` / `npm ci` through scripts/build-native.mjs; when it cannot be built the
# TypeScript engine runs instead, with the same report. -O2 in place of node-gyp's -O3: -O3 was no
# faster on the bench stack. -ffp-contract=off: no fused multiply-add, so the numbers match the
# TypeScript's. (An -O3 tried via cflags_cc alone is removed again by "cflags_cc!" below.)
{
  "targets": [
    {
      "target_name": "hotlap_inspection",
      "sources": [
        "<!@(node -p \"require('fs').readdirSync('lib/inspection/native').filter(f => f.endsWith('.cc')).map(f => 'lib/inspection/native/' + f).join(' ')\")"
      ],
      "include_dirs": ["<!@(node -p \"require('node-addon-api').include\")"],
      "defines": ["NAPI_VERSION=8", "NAPI_CPP_EXCEPTIONS"],
      "cflags!": ["-fno-exceptions", "-O3"],
      "cflags_cc!": ["-fno-exceptions", "-std=gnu++17", "-O3"],
      "cflags_cc": ["-std=c++17", "-O2", "-ffp-contract=off", "-fexceptions", "-Wall", "-Wextra"],
      "xcode_settings": {
        "GCC_ENABLE_CPP_EXCEPTIONS": "YES",
        "OTHER_CPLUSPLUSFLAGS": ["-std=c++17", "-O2", "-ffp-contract=off"]
      },
      "msvs_settings": { "VCCLCompilerTool": { "ExceptionHandling": 1 } }
    }
  ]
}
