import { describe, it, expect } from 'vitest';
import { computeExtrusionLimit, expectedMassG, speedCeilingMms, speedCeilings, ExtrusionTestSchema } from '@/lib/extrusion';

describe('extrusion-limit test', () => {
  it('expected mass of 100 mm of 1.75 mm PLA, worked by hand', () => {
    // By hand: area = π × 1.75² / 4 = 2.40528 mm²; × 100 mm = 240.528 mm³ = 0.240528 cm³;
    // × 1.24 g/cm³ (PLA density, PrusaSlicer profile bundle, see lib/inspection/materials.ts) = 0.29825 g.
    expect(expectedMassG(100, 1.75, 1.24)).toBeCloseTo(0.29825, 5);
  });

  it('efficiency per step and the limit against a hand-computed example (weighed reference)', () => {
    const r = computeExtrusionLimit({
      materialFamily: 'pla',
      filamentDiameterMm: 1.75,
      sampleLengthMm: 100,
      referenceMassG: 0.3,
      steps: [
        { rateMm3s: 40, massG: 0.285 },
        { rateMm3s: 10, massG: 0.3 },
        { rateMm3s: 30, massG: 0.294 },
        { rateMm3s: 20, massG: 0.297 },
      ],
    });
    // By hand: 0.300/0.300 = 100 %, 0.297/0.300 = 99 %, 0.294/0.300 = 98 % (passes at exactly the
    // 98 % threshold), 0.285/0.300 = 95 % (fails). Limit = 30 mm³/s.
    expect(r.referenceSource).toBe('weighed');
    expect(r.steps.map((s) => s.rateMm3s)).toEqual([10, 20, 30, 40]);
    expect(r.steps.map((s) => Math.round(s.efficiencyPercent * 100) / 100)).toEqual([100, 99, 98, 95]);
    expect(r.steps.map((s) => s.passes)).toEqual([true, true, true, false]);
    expect(r.limitFlowMm3s).toBe(30);
    expect(r.nonMonotonic).toBe(false);
    // By hand: 30 mm³/s ÷ (0.2 mm × 0.4 mm) = 375 mm/s.
    expect(r.ceilings.find((c) => c.layerHeightMm === 0.2 && c.lineWidthMm === 0.4)!.speedMms).toBeCloseTo(375, 6);
    expect(r.ceilings).toHaveLength(9);
  });

  it('uses the computed mass when no reference was weighed', () => {
    const r = computeExtrusionLimit({
      materialFamily: 'pla', filamentDiameterMm: 1.75, sampleLengthMm: 100,
      steps: [{ rateMm3s: 15, massG: 0.2923 }, { rateMm3s: 25, massG: 0.2900 }],
    });
    // By hand: reference 0.29825 g; 0.2923/0.29825 = 98.0 % (pass), 0.2900/0.29825 = 97.2 % (fail).
    expect(r.referenceSource).toBe('computed');
    expect(r.steps[0].efficiencyPercent).toBeCloseTo(98.005, 2);
    expect(r.limitFlowMm3s).toBe(15);
  });

  it('a non-monotonic curve keeps the last pass before the first failure', () => {
    const r = computeExtrusionLimit({
      materialFamily: 'petg', filamentDiameterMm: 1.75, sampleLengthMm: 100, referenceMassG: 0.3, thresholdPercent: 98,
      steps: [{ rateMm3s: 10, massG: 0.3 }, { rateMm3s: 20, massG: 0.28 }, { rateMm3s: 30, massG: 0.299 }],
    });
    expect(r.limitFlowMm3s).toBe(10);
    expect(r.nonMonotonic).toBe(true);
  });

  it('no limit when the first step fails', () => {
    const r = computeExtrusionLimit({ materialFamily: 'pla', filamentDiameterMm: 1.75, sampleLengthMm: 100, referenceMassG: 0.3, steps: [{ rateMm3s: 10, massG: 0.2 }] });
    expect(r.limitFlowMm3s).toBeNull();
    expect(r.ceilings).toEqual([]);
  });

  it('40 mm³/s at 0.1 mm × 0.4 mm allows about 1000 mm/s', () => {
    // Trade fact (common practice, no source): 40 mm³/s at 0.1 mm layers and 0.4 mm lines ≈ 1000 mm/s.
    expect(speedCeilingMms(40, 0.1, 0.4)).toBeCloseTo(1000, 6);
  });

  it('the schema refuses bad input with sentences', () => {
    const bad = ExtrusionTestSchema.safeParse({ materialFamily: 'pla', filamentDiameterMm: -1, sampleLengthMm: 100, steps: [{ rateMm3s: 10, massG: 1 }, { rateMm3s: 10, massG: 1 }] });
    expect(bad.success).toBe(false);
    const msgs = bad.error!.issues.map((i) => i.message);
    expect(msgs).toContain('The filament diameter must be more than 0.');
    expect(msgs.some((m) => m.includes('listed twice'))).toBe(true);
  });
});

describe('speed-ceiling table capped by the machine', () => {
  it('a 600 mm/s machine is never told more than 600 mm/s', () => {
    // Flow 60 mm³/s: 60 ÷ (0.1 × 0.4) = 1500 mm/s from the flow alone (v = Q ÷ (h × w), the trade's
    // rectangular-bead rule of thumb, hand-computed); the machine's record says 600 mm/s (invented machine).
    const rows = speedCeilings(60, { maxSpeedMms: 600 });
    const thin = rows.find((c) => c.layerHeightMm === 0.1 && c.lineWidthMm === 0.4)!;
    expect(thin.flowSpeedMms).toBeCloseTo(1500, 6);
    expect(thin.speedMms).toBe(600);
    expect(thin.limitedBy).toBe('machine');
    expect(Math.max(...rows.map((c) => c.speedMms))).toBe(600);
    // By hand: 60 ÷ (0.3 × 0.6) = 333.3 mm/s, below the machine's 600: the flow decides.
    const thick = rows.find((c) => c.layerHeightMm === 0.3 && c.lineWidthMm === 0.6)!;
    expect(thick.speedMms).toBeCloseTo(333.333, 2);
    expect(thick.limitedBy).toBe('flow');
  });

  it('no speed limit in the record: the flow alone decides', () => {
    // By hand: 30 ÷ (0.2 × 0.45) = 333.3 mm/s.
    for (const machine of [undefined, null, { maxSpeedMms: null }]) {
      const c = speedCeilings(30, machine).find((x) => x.layerHeightMm === 0.2 && x.lineWidthMm === 0.45)!;
      expect(c.speedMms).toBeCloseTo(333.333, 2);
      expect(c.limitedBy).toBe('flow');
    }
  });

  it('computeExtrusionLimit passes the machine on to the table', () => {
    // Limit 30 mm³/s (weighed reference 0.3 g, 0.3 g sample = 100 %); 30 ÷ (0.1 × 0.4) = 750 mm/s by
    // flow, capped at the invented machine's 500 mm/s.
    const r = computeExtrusionLimit({ materialFamily: 'pla', filamentDiameterMm: 1.75, sampleLengthMm: 100, referenceMassG: 0.3, steps: [{ rateMm3s: 30, massG: 0.3 }], machine: { maxSpeedMms: 500 } });
    const c = r.ceilings.find((x) => x.layerHeightMm === 0.1 && x.lineWidthMm === 0.4)!;
    expect(c.flowSpeedMms).toBeCloseTo(750, 6);
    expect(c.speedMms).toBe(500);
  });
});
