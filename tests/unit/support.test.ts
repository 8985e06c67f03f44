/** The shared test and script helpers in tests/support: the seeded PRNG and the server wait. */
import { spawn } from 'node:child_process';
import { createServer } from 'node:net';
import { describe, expect, it } from 'vitest';
import { mulberry32 } from '../support/prng';
import { waitForServer } from '../support/server';

describe('mulberry32', () => {
  it('gives the same sequence for the same seed and another for another seed', () => {
    const take = (seed: number) => {
      const r = mulberry32(seed);
      return Array.from({ length: 5 }, r);
    };
    expect(take(20261201)).toEqual(take(20261201));
    expect(take(20261201)).not.toEqual(take(42));
  });
  it('stays in [0, 1) and spreads evenly', () => {
    const r = mulberry32(7);
    let sum = 0;
    for (let i = 0; i < 100_000; i++) {
      const x = r();
      expect(x >= 0 && x < 1).toBe(true);
      sum += x;
    }
    // A uniform variable on [0, 1) has mean 1/2 (common knowledge); 100 000 draws land within ±0.005.
    expect(Math.abs(sum / 100_000 - 0.5)).toBeLessThan(0.005);
  });
});

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });

describe('waitForServer', () => {
  it('resolves once the URL answers 2xx', async () => {
    const port = await freePort();
    const child = spawn(process.execPath, ['-e', `setTimeout(() => require('node:http').createServer((q, s) => s.end('ok')).listen(${port}, '127.0.0.1'), 300)`], { stdio: ['ignore', 'pipe', 'pipe'] });
    try {
      await waitForServer(child, `http://127.0.0.1:${port}/`, 'The stub');
    } finally {
      child.kill();
    }
  });
  it('throws with what the child wrote when it exits first', async () => {
    const port = await freePort();
    const child = spawn(process.execPath, ['-e', 'console.error("no database"); process.exit(3)'], { stdio: ['ignore', 'pipe', 'pipe'] });
    await expect(waitForServer(child, `http://127.0.0.1:${port}/`, 'The stub')).rejects.toThrow(/^The stub did not start:\nno database/);
  });
});
