import { describe, it, expect } from 'vitest';
import { bandLabel, bandOf, layerTimes, niceBands, niceStep, robustRange, spreadColour, BAND_COLOURS } from '@/components/judging/previewModes';

describe('preview legend bands (rounded steps; common practice for chart axes, no source)', () => {
  it('picks 1, 2, 2.5 or 5 × 10^k steps', () => {
    expect(niceStep(100, 6)).toBe(20);
    expect(niceStep(0.3, 6)).toBe(0.05);
    expect(niceStep(12, 6)).toBe(2);
    expect(niceStep(14, 6)).toBe(2.5);
  });

  it('covers the file’s range with rounded edges, no holes, at most as many bands as colours', () => {
    const e = niceBands(37, 212);
    expect(e[0]).toBeLessThanOrEqual(37);
    expect(e.every((v) => v % 25 === 0 || v % 20 === 0 || v % 50 === 0)).toBe(true);
    expect(e[e.length - 1]).toBeLessThanOrEqual(212);
    expect(e.length).toBeLessThanOrEqual(BAND_COLOURS.length);
    for (let i = 1; i < e.length; i++) expect(e[i] - e[i - 1]).toBeCloseTo(e[1] - e[0], 9);
    expect(bandOf(e, 37)).toBe(0);
    expect(bandOf(e, 212)).toBe(e.length - 1);
  });

  it('labels line widths with the decimals the step needs, free of float noise', () => {
    const e = niceBands(0.42, 0.71);
    expect(e).toEqual([0.4, 0.45, 0.5, 0.55, 0.6, 0.65, 0.7]);
    expect(bandLabel(e, 0)).toBe('0.40–0.45');
    expect(bandLabel(e, e.length - 1)).toBe('0.70–0.75');
  });

  it('a file with one value gets one band', () => {
    expect(niceBands(50, 50)).toHaveLength(1);
    expect(bandOf(niceBands(50, 50), 50)).toBe(0);
  });

  it('matches the report’s layer times to preview levels by Z; a prime-line level gets none', () => {
    expect(layerTimes([0.2, 0.25, 0.4], { zMm: [0.2, 0.4], timeS: [31, 12.5] })).toEqual([31, null, 12.5]);
    expect(layerTimes([0.2], null)).toEqual([null]);
  });

  it('a few odd records do not stretch the scale: 2nd–98th percentile by length, open end bands', () => {
    // 1 m of 0.45 mm lines, 1 mm of a 2.4 mm purge blob.
    const r = robustRange([{ v: 0.45, w: 1000 }, { v: 0.43, w: 500 }, { v: 2.4, w: 1 }])!;
    expect(r.max).toBe(0.45);
    expect(r.above).toBe(true);
    const e = niceBands(r.min, r.max);
    expect(e[e.length - 1]).toBeLessThan(0.5);
    expect(bandLabel(e, e.length - 1, { high: true })).toMatch(/^≥ /);
    expect(bandLabel(e, 0, { low: true })).toMatch(e.length > 1 ? /^< / : /^\d/);
    expect(robustRange([])).toBeNull();
  });

  it('a legend of few bands still runs from the coolest to the warmest colour', () => {
    expect(spreadColour(0, 5)).toBe(BAND_COLOURS[0]);
    expect(spreadColour(4, 5)).toBe(BAND_COLOURS[BAND_COLOURS.length - 1]);
    expect(spreadColour(0, 1)).toBe(BAND_COLOURS[0]);
  });
});
