/** Axis ticks: round steps, covering the data, no float noise, clock steps for durations, whole days. */
import { describe, expect, it } from 'vitest';
import { niceDayTicks, niceStep, niceTicks, niceTimeTicks } from '@/lib/charts/niceTicks';

describe('niceTicks', () => {
  // Heckbert, "Nice numbers for graph labels", Graphics Gems (1990): steps of 1, 2 or 5 × 10ⁿ.
  it('uses 1, 2 or 5 × 10ⁿ steps and covers the data with ticks at both ends', () => {
    const a = niceTicks(0, 37.3, 5);
    expect(a.step).toBe(10);
    expect(a.ticks).toEqual([0, 10, 20, 30, 40]);
    expect(a.domain).toEqual([0, 40]);
    const b = niceTicks(83.2, 101.4, 5);
    expect(b.step).toBe(5);
    expect(b.ticks[0]).toBeLessThanOrEqual(83.2);
    expect(b.ticks.at(-1)).toBeGreaterThanOrEqual(101.4);
    for (const t of b.ticks) expect(t % 5).toBe(0);
  });
  it('leaves no float noise in decimal steps', () => {
    const a = niceTicks(0, 0.9, 5);
    expect(a.step).toBe(0.2);
    expect(a.ticks).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
  });
  it('keeps a bounded number of ticks over many ranges (labels cannot crowd)', () => {
    for (let i = 0; i < 200; i++) {
      const lo = (i * 37.7) % 500;
      const hi = lo + 0.01 + ((i * 91.3) % 2000);
      const a = niceTicks(lo, hi, 5);
      expect(a.ticks.length).toBeGreaterThanOrEqual(2);
      expect(a.ticks.length).toBeLessThanOrEqual(12);
      expect(a.domain[0]).toBeLessThanOrEqual(lo);
      expect(a.domain[1]).toBeGreaterThanOrEqual(hi);
    }
  });
  it('keeps whole steps for counts and handles one value or nothing', () => {
    expect(niceTicks(0, 3, 5, { integer: true }).ticks).toEqual([0, 1, 2, 3]);
    expect(niceTicks(7, 7).ticks.length).toBeGreaterThanOrEqual(2);
    expect(niceTicks(NaN, NaN).ticks).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
  });
  it('is the step the histogram bins use', () => {
    expect(niceStep(24)).toBe(50);
  });
});

describe('niceTimeTicks and niceDayTicks', () => {
  // Common practice, no source: clock axes step in 1/2/5/10/15/30 s or min, then hours.
  it('steps durations in clock units', () => {
    const a = niceTimeTicks(1200, 2000, 5); // 20:00 to 33:20
    expect(a.step).toBe(300);
    expect(a.ticks).toEqual([1200, 1500, 1800, 2100]);
    expect(niceTimeTicks(0, 50, 5).step).toBe(10);
    expect(niceTimeTicks(0, 5 * 3600, 5).step).toBe(3600);
  });
  it('steps dates in whole UTC days or weeks', () => {
    const day = 86_400_000;
    const start = Date.parse('2026-11-01T00:00:00Z');
    const a = niceDayTicks(start + 5 * 3600_000, start + 40 * day, 6);
    expect(a.step).toBe(7 * day);
    for (const t of a.ticks) expect(t % day).toBe(0);
    expect(a.ticks[0]).toBeLessThanOrEqual(start + 5 * 3600_000);
  });
});
