import { describe, expect, it } from 'vitest';
import { checkPlausibility, FLAG_CODES, scalePercent, sizeDeviations, type PlausibilityReport } from '@/lib/inspection/plausibility';

const base: PlausibilityReport = {
  time: { estimated_s: 1000 },
  flow: { peak_mm3s: 20 },
  filament: { volume_mm3: 20_000 },
  size_mm: { x: 36, y: 39, z: 40 },
};
const codes = (f: { code: string }[]) => f.map((x) => x.code);

describe('plausibility checks (worked examples by hand)', () => {
  it('nothing claimed, nothing flagged', () => {
    expect(checkPlausibility(base, {})).toEqual([]);
  });

  it('claimed time shorter than the estimate: says by how much', () => {
    // 1000 s estimate, 750 s claimed → 250 s (25.0 %) short.
    const f = checkPlausibility(base, { claimedTimeMs: 750_000 });
    expect(codes(f)).toEqual(['claimed_time_below_estimate']);
    expect(f[0].severity).toBe('blocking');
    expect(f[0].message).toContain('12 min 30 s is 4 min 10 s (25.0 %) shorter than the 16 min 40 s');
    expect(checkPlausibility(base, { claimedTimeMs: 1_000_000 })).toEqual([]);
  });

  it('mean implied flow above the machine limit: 20 000 mm³ in 600 s = 33.3 mm³/s vs 25', () => {
    // 20 000 ÷ 600 = 33.33 mm³/s (arithmetic by hand).
    const f = checkPlausibility({ ...base, time: { estimated_s: 500 } }, { claimedTimeMs: 600_000, machineFlowLimitMm3s: 25 });
    expect(codes(f)).toEqual(['mean_flow_above_machine_limit']);
    expect(f[0].message).toContain('mean flow of 33.3 mm³/s, above the machine\'s measured limit of 25.0 mm³/s');
    // 20 000 mm³ in 1000 s = 20 mm³/s: under a 25 mm³/s limit.
    expect(checkPlausibility(base, { claimedTimeMs: 1_000_000, machineFlowLimitMm3s: 25 })).toEqual([]);
  });

  it('peak commanded flow above the limit', () => {
    const f = checkPlausibility({ ...base, flow: { peak_mm3s: 41.2 } }, { machineFlowLimitMm3s: 30 });
    expect(codes(f)).toEqual(['peak_flow_above_machine_limit']);
    expect(f[0].message).toContain('41.2 mm³/s, above the machine\'s measured limit of 30.0 mm³/s');
  });

  it('measured part off the test piece beyond tolerance: deviation in mm and %', () => {
    // Z 40 → 39.2 mm is −0.80 mm, −2.0 %; X 36.2 is +0.56 % (inside 1 %).
    const f = checkPlausibility(base, { measuredDimensionsMm: { x: 36.2, y: 39, z: 39.2 }, testPieceSizeMm: { x: 36, y: 39, z: 40 } });
    expect(codes(f)).toEqual(['dimensions_off_test_piece']);
    expect(f[0].message).toContain('Z -0.80 mm (-2.0 %)');
    expect(f[0].message).not.toContain('X ');
    expect(checkPlausibility(base, { measuredDimensionsMm: { x: 36.3, y: 39, z: 40 }, testPieceSizeMm: { x: 36, y: 39, z: 40 } })).toEqual([]);
  });

  it('G-code scaled relative to the test piece', () => {
    // 95 % scale: 34.2 × 37.05 × 38 mm against 36 × 39 × 40 mm.
    const f = checkPlausibility({ ...base, size_mm: { x: 34.2, y: 37.05, z: 38 } }, { testPieceSizeMm: { x: 36, y: 39, z: 40 } });
    expect(codes(f)).toEqual(['scale_off_test_piece']);
    expect(f[0].message).toContain('about 95.0 %');
    expect(scalePercent({ x: 34.2, y: 37.05, z: 38 }, { x: 36, y: 39, z: 40 })).toBeCloseTo(95, 9);
    // 100.5 % is within the default ±1 %, but not within ±0.25 %.
    const ok = { ...base, size_mm: { x: 36.18, y: 39.195, z: 40.2 } };
    expect(checkPlausibility(ok, { testPieceSizeMm: { x: 36, y: 39, z: 40 } })).toEqual([]);
    expect(codes(checkPlausibility(ok, { testPieceSizeMm: { x: 36, y: 39, z: 40 }, scaleTolerancePercent: 0.25 }))).toEqual(['scale_off_test_piece']);
  });

  it('same G-code hash used by another entrant', () => {
    const f = checkPlausibility(base, { duplicateOfEntry: 'E-0042' });
    expect(codes(f)).toEqual(['duplicate_gcode']);
    expect(f[0].message).toContain('entry E-0042');
  });

  it('says when a figure needed for a check is missing, and refuses a non-positive claimed time', () => {
    expect(codes(checkPlausibility({ ...base, time: { estimated_s: null } }, { claimedTimeMs: 600_000 }))).toEqual(['missing_estimate']);
    expect(codes(checkPlausibility({ ...base, filament: { volume_mm3: null } }, { claimedTimeMs: 2_000_000, machineFlowLimitMm3s: 25 }))).toEqual(['missing_estimate']);
    expect(checkPlausibility(base, { claimedTimeMs: 0 })[0].message).toMatch(/not a positive duration/);
  });

  it('uses only codes from the one list', () => {
    const all = checkPlausibility(
      { ...base, flow: { peak_mm3s: 99 }, size_mm: { x: 10, y: 10, z: 10 } },
      { claimedTimeMs: 100_000, machineFlowLimitMm3s: 10, measuredDimensionsMm: { x: 1, y: 1, z: 1 }, testPieceSizeMm: { x: 36, y: 39, z: 40 }, duplicateOfEntry: 'x' },
    );
    expect(all.length).toBe(6);
    for (const f of all) {
      expect(Object.keys(FLAG_CODES)).toContain(f.code);
      expect(f.severity).toBe(FLAG_CODES[f.code as keyof typeof FLAG_CODES].severity);
    }
  });

  it('sizeDeviations is signed per axis', () => {
    expect(sizeDeviations({ x: 10.5, y: 9, z: 10 }, { x: 10, y: 10, z: 10 }).map((d) => [d.axis, Number(d.deltaMm.toFixed(3)), Number(d.percent.toFixed(3))])).toEqual([
      ['x', 0.5, 5],
      ['y', -1, -10],
      ['z', 0, 0],
    ]);
  });
});
