/**
 * Runs in the browser before the app's own modules (Next.js client instrumentation hook).
 * zod 4 compiles object parsers with `new Function` when it may: it probes for that once, and under
 * our Content-Security-Policy (no 'unsafe-eval') the probe is reported as a CSP violation. Whether
 * to compile is decided when a schema is built, so "jitless" must be set before any module that
 * builds a schema loads. zod keeps its configuration in one object on `globalThis`
 * (`__zod_globalConfig`, created on first load unless present): setting it here, without importing
 * zod, keeps zod itself off the pages that do not use it. tests/unit/zod-jitless.test.ts checks that
 * zod reads this object (it fails if a zod upgrade moves it).
 */
const g = globalThis as typeof globalThis & { __zod_globalConfig?: Record<string, unknown> };
g.__zod_globalConfig = Object.assign(g.__zod_globalConfig ?? {}, { jitless: true });
export {};
