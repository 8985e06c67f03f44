/**
 * Measurements on synthetic G-code with known answers, and the flow model against Slic3r's
 * published flow math.
 */
import { describe, expect, it } from 'vitest';
import { crossSectionMm2, lineWidthMm } from '../../../lib/inspection/measure';
import { filamentAreaMm2 } from '../../../lib/inspection/materials';
import { inspectBytes, sum } from './engineHelpers';

const AREA = filamentAreaMm2(1.75);

/** Relative-E G-code for a square loop of side `side` centred at (cx, cy), at line width w and layer height h. */
function square(cx: number, cy: number, side: number, z: number, w: number, h: number, feedMmMin = 3000): string[] {
  const ePerMm = crossSectionMm2(w, h) / AREA;
  const c = [
    [cx - side / 2, cy - side / 2],
    [cx + side / 2, cy - side / 2],
    [cx + side / 2, cy + side / 2],
    [cx - side / 2, cy + side / 2],
    [cx - side / 2, cy - side / 2],
  ];
  const out = [`G0 X${c[0][0]} Y${c[0][1]} Z${z}`, `G1 F${feedMmMin}`];
  for (let i = 1; i < c.length; i++) out.push(`G1 X${c[i][0]} Y${c[i][1]} E${(side * ePerMm).toFixed(6)}`);
  return out;
}

describe('filament and flow model', () => {
  it('1.75 mm filament has a cross-section of π·0.875² = 2.405 mm²', () => {
    expect(AREA).toBeCloseTo(2.405, 3);
    expect(AREA).toBeCloseTo(Math.PI * 0.875 * 0.875, 12);
  });

  it("line width follows Slic3r's flow math, A = (w − h)·h + π(h/2)², both directions (Slic3r manual, flow math)", () => {
    // h = 0.2, w = 0.45: A = 0.25·0.2 + π·0.01 = 0.0814159 mm²
    expect(crossSectionMm2(0.45, 0.2)).toBeCloseTo(0.05 + Math.PI * 0.01, 12);
    expect(lineWidthMm(0.05 + Math.PI * 0.01, 0.2)).toBeCloseTo(0.45, 12);
    for (const [w, h] of [
      [0.4, 0.1],
      [0.68, 0.3],
      [1.2, 0.6],
    ]) {
      expect(lineWidthMm(crossSectionMm2(w, h), h)).toBeCloseTo(w, 12);
    }
  });

  it('40 mm³/s at 0.1 mm × 0.4 mm allows about 1000 mm/s (trade fact: common practice, no source)', async () => {
    // A move at 1000 mm/s whose E fills a 0.4 × 0.1 mm rectangle commands 40 mm³/s.
    const eMm = (100 * 0.4 * 0.1) / AREA;
    const r = await inspectBytes(`M83\nG1 Z0.1 F600\nG1 X100 E${eMm} F60000`);
    expect(r.flow.peakMm3s).toBeCloseTo(40, 6);
    // With the round-ended bead the same flow allows 40 / A(0.4, 0.1) ≈ 1057 mm/s: still "about 1000".
    expect(40 / crossSectionMm2(0.4, 0.1)).toBeGreaterThan(950);
    expect(40 / crossSectionMm2(0.4, 0.1)).toBeLessThan(1100);
  });

  it('net filament counts retracts and unretracts, and volume and mass follow from it', async () => {
    const r = await inspectBytes('M83\nG1 Z0.2 F600\nG1 X10 E1 F1200\nG1 E-0.8 F2400\nG1 X20\nG1 E0.8\nG1 X30 E1', { material: 'petg' });
    expect(r.filament.lengthMm).toBeCloseTo(2, 12);
    expect(r.filament.volumeMm3).toBeCloseTo(2 * AREA, 12);
    // PETG 1.27 g/cm³ (the materials table): g = mm³ / 1000 × g/cm³
    expect(r.filament.massG).toBeCloseTo(((2 * AREA) / 1000) * 1.27, 12);
    expect(r.filament.retractions).toBe(1);
  });
});

describe('flow statistics', () => {
  it('peak, time-weighted 95th percentile and mean (total volume ÷ total extruding time)', async () => {
    // 90 s at 10 mm³/s in ONE move and 10 s at 30 mm³/s in 100 short moves: by count the 95th
    // percentile would be 30, by time it is inside the last 5 % of time, also 30; the 90th is 10.
    const lines = ['M83', 'G1 Z0.2 F600'];
    const feed = 10; // mm/s
    lines.push(`G1 X${90 * feed} E${(90 * 10) / AREA} F${feed * 60}`);
    for (let i = 0; i < 100; i++) lines.push(`G1 X${900 + (i + 1) * 1} E${(0.1 * 30) / AREA}`);
    const r = await inspectBytes(lines.join('\n'));
    expect(r.flow.peakMm3s).toBeCloseTo(30, 6);
    expect(r.flow.p95Mm3s).toBeGreaterThan(29.9);
    expect(r.flow.p95Mm3s).toBeLessThanOrEqual(30 + 1e-9);
    expect(r.flow.meanMm3s).toBeCloseTo((900 + 300) / 100, 6);
    expect(sum(r.flow.histogram.timeS)).toBeCloseTo(100, 6);
  });

  it('the p95 is weighted by time, not by move count', async () => {
    // 1000 short moves at 30 mm³/s (1 s in total) and one 99 s move at 10 mm³/s: p95 is 10.
    const lines = ['M83', 'G1 Z0.2 F600', 'G1 F600'];
    for (let i = 0; i < 1000; i++) lines.push(`G1 X${(i + 1) * 0.01} E${(0.001 * 30) / AREA}`);
    lines.push(`G1 X${10 + 990} E${(99 * 10) / AREA}`);
    const r = await inspectBytes(lines.join('\n'));
    expect(r.flow.p95Mm3s).toBeGreaterThan(9.9);
    expect(r.flow.p95Mm3s).toBeLessThanOrEqual(10.05);
  });

  it('the chart time series stays at most 600 points however long the print', async () => {
    const lines = ['M83', 'G1 Z0.2 F600', 'G1 F60'];
    for (let i = 0; i < 3000; i++) lines.push(`G1 X${i % 2 === 0 ? 10 : 0} E0.1`); // 3000 × 10 s
    const r = await inspectBytes(lines.join('\n'));
    expect(r.time.estimatedS).toBeGreaterThan(29000);
    expect(r.flow.timeSeries.maxMm3s.length).toBeLessThanOrEqual(600);
    expect(r.flow.timeSeries.maxMm3s.length * r.flow.timeSeries.bucketS).toBeGreaterThanOrEqual(r.time.estimatedS - r.flow.timeSeries.bucketS);
  });
});

describe('layers, size and objects without any comments', () => {
  const w = 0.45;
  const build = (centres: [number, number][], withSkirt: boolean, prime: boolean) => {
    const lines = ['G21', 'G90', 'M83'];
    if (prime) lines.push('G1 X5 Y5 Z0.5 F6000', 'G1 X105 E10 F1800', 'G1 E-0.8 F2400'); // prime line above the first layer
    const zs = [0.3];
    for (let i = 1; i < 10; i++) zs.push(+(0.3 + 0.2 * i).toFixed(3));
    zs.forEach((z, li) => {
      const h = li === 0 ? 0.3 : 0.2;
      if (li === 0 && withSkirt) lines.push(...square(115, 100, 60, z, w, h)); // one loop around everything
      for (const [cx, cy] of centres) lines.push(...square(cx, cy, 20, z, w, h), ...square(cx, cy, 19.1, z, w, h));
    });
    return lines.join('\n');
  };

  it('one square tower: 10 layers of 0.2 mm over a 0.3 mm first layer, 1 object, size with the line width', async () => {
    const r = await inspectBytes(build([[100, 100]], true, true));
    expect(r.layers.count).toBe(10);
    expect(r.layers.heightMm).toBe(0.2);
    expect(r.layers.firstHeightMm).toBe(0.3);
    expect(r.objects).toBe(1);
    // Centre lines 20 mm apart + one line width = 20.45 mm outer size; Z = top layer.
    expect(r.sizeMm?.x).toBeCloseTo(20 + w, 6);
    expect(r.sizeMm?.y).toBeCloseTo(20 + w, 6);
    expect(r.sizeMm?.z).toBeCloseTo(2.1, 9);
    expect(r.filament.preambleMm).toBeCloseTo(10 - 0.8, 9); // the prime line is not part of the print
    expect(r.layers.timeS).toHaveLength(10);
  });

  it('two towers 10 mm apart inside one skirt are 2 objects', async () => {
    const r = await inspectBytes(build([[100, 100], [130, 100]], true, false));
    expect(r.objects).toBe(2);
    expect(r.sizeMm?.x).toBeCloseTo(50 + w, 6);
  });

  it('line width per feature comes back from the flow model', async () => {
    const r = await inspectBytes(`;TYPE:External perimeter\n${build([[100, 100]], false, false)}`);
    const f = r.features.find((x) => x.feature === 'outer-wall');
    expect(f?.lineWidthMm.mean).toBeCloseTo(w, 3);
    expect(f?.speedMms.mean).toBeCloseTo(50, 9);
  });
});

describe('spiral extrusion', () => {
  it('a spiral (vase mode) gets no layers of its own and an advisory', async () => {
    const lines = ['M83', 'G1 Z0.2 F600', 'G1 X10 E0.5', 'G1 F1200'];
    for (let i = 1; i <= 100; i++) lines.push(`G1 X${i % 2 ? 0 : 10} Z${(0.2 + i * 0.02).toFixed(2)} E0.4`);
    const r = await inspectBytes(lines.join('\n'));
    expect(r.layers.count).toBe(1);
    expect(r.warnings.find((w) => w.code === 'non_planar_extrusion')?.severity).toBe('advisory');
    expect(r.sizeMm?.z).toBeCloseTo(2.2, 9);
  });
});

describe('bounded layer records', () => {
  it('past 20 000 layers the count goes on but per-layer records stop, with a note', async () => {
    const lines = ['M83', 'G1 F6000'];
    for (let i = 1; i <= 20_050; i++) lines.push(`G1 Z${(i * 0.01).toFixed(2)}`, `G1 X${i % 2 ? 1 : 0} E0.01`);
    const r = await inspectBytes(lines.join('\n'));
    expect(r.layers.count).toBe(20_050);
    expect(r.layers.timeS.length).toBe(20_000);
    expect(r.layers.heightMm).toBe(0.01);
    expect(r.warnings.map((w) => w.code)).toContain('layers_not_listed');
  });
});

describe('overrides', () => {
  it('reports the highest and lowest speed and flow factors and where they are', async () => {
    const r = await inspectBytes('M220 S150\nM221 S95\nG1 X1 F600\nM220 S100\nM221 S100');
    expect(r.overrides).toMatchObject({ feedPercentMax: 150, feedPercentMin: 100, feedLineNo: 1, flowPercentMax: 100, flowPercentMin: 95 });
    expect(r.warnings.map((x) => x.code)).toEqual(expect.arrayContaining(['speed_override', 'flow_override']));
  });
});
