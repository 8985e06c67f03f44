/**
 * Runs in the browser before the app's own modules (Next.js client instrumentation hook).
 * zod 4 compiles object parsers with `new Function` when it may: it probes for that once, and under
 * our Content-Security-Policy (no 'unsafe-eval') the probe is reported as a CSP violation. The
 * probe happens when a schema is built, so "jitless" must be set before any schema module loads.
 */
import { config } from 'zod';

config({ jitless: true });
