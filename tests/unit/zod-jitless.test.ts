/**
 * instrumentation-client.ts sets zod's "jitless" in the browser without importing zod, through the
 * configuration object zod keeps on globalThis. This reads the setting back from zod itself, loaded
 * after that module as in the browser, and checks that an object schema then builds no parser with
 * `new Function` (which the Content-Security-Policy forbids in the browser).
 */
import { describe, it, expect, vi } from 'vitest';

describe('zod jitless from instrumentation-client.ts', () => {
  it('zod loaded afterwards reports jitless and never calls new Function', async () => {
    vi.resetModules();
    delete (globalThis as { __zod_globalConfig?: unknown }).__zod_globalConfig;
    await import('@/instrumentation-client');
    const spy = vi.spyOn(globalThis, 'Function');
    const { z, config } = await import('zod');
    expect(config().jitless).toBe(true);
    const schema = z.object({ a: z.string(), b: z.number() });
    for (let i = 0; i < 3; i++) expect(schema.parse({ a: 'x', b: i })).toEqual({ a: 'x', b: i });
    expect(spy).not.toHaveBeenCalled();
    spy.mockRestore();
  });
});
