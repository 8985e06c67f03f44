import { existsSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  MATERIAL_FAMILIES,
  MATERIALS,
  MaterialFamilySchema,
  densityGcm3,
  materialCaution,
  materialFamilyFromText,
} from '@/lib/inspection/materials';

/**
 * Source: PrusaSlicer 2.5.0 filament profile bundle (Debian prusa-slicer 2.5.0+dfsg-4),
 * /usr/share/PrusaSlicer/profiles/PrusaResearch.ini, key `filament_density` (g/cm³).
 * Each expected value is the one printed on the cited line of that file.
 */
const CITED: Record<string, { line: number; density: number }> = {
  pla: { line: 2704, density: 1.24 }, // [filament:Generic PLA]
  petg: { line: 2157, density: 1.27 }, // [filament:Generic PETG]
  abs: { line: 2119, density: 1.04 }, // [filament:Generic ABS]
  asa: { line: 1974, density: 1.07 }, // an ASA profile (filament_type = ASA)
  tpu: { line: 2804, density: 1.22 }, // [filament:Generic FLEX]
  pa: { line: 3025, density: 1.1 }, // an unfilled PA profile
  pc: { line: 3053, density: 1.2 }, // a PC profile
};
const BUNDLE = '/usr/share/PrusaSlicer/profiles/PrusaResearch.ini';

describe('material densities', () => {
  it('match the cited profile-bundle values', () => {
    for (const [family, cited] of Object.entries(CITED)) {
      expect(densityGcm3(family as never), family).toBe(cited.density);
      expect(MATERIALS[family as keyof typeof MATERIALS].densitySource).toContain(`line ${cited.line}`);
    }
  });

  // Re-reads the bundle when the slicer is installed, so the citation itself is checked.
  it.runIf(existsSync(BUNDLE))('equal the lines of PrusaResearch.ini they cite', () => {
    const lines = readFileSync(BUNDLE, 'utf8').split('\n');
    for (const [family, cited] of Object.entries(CITED)) {
      expect(lines[cited.line - 1].trim(), family).toBe(`filament_density = ${cited.density}`);
    }
  });

  it('has one entry per family and a zod enum of the same list', () => {
    expect(Object.keys(MATERIALS).sort()).toEqual([...MATERIAL_FAMILIES].sort());
    expect(MaterialFamilySchema.parse('petg')).toBe('petg');
    const bad = MaterialFamilySchema.safeParse('wood');
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0].message).toContain('pla, petg');
  });

  it('flags styrene-bearing families for ventilation', () => {
    // ABS and ASA contain styrene units (common practice, no source): the caution names ventilation.
    expect(materialCaution('abs')).toMatch(/styrene.*ventilate/i);
    expect(materialCaution('asa')).toMatch(/styrene/);
    expect(materialCaution('pla')).toBeNull();
    expect(materialCaution('petg')).toBeNull();
  });

  it('maps slicer filament_type text to families', () => {
    // Values as slicers write them in their settings blocks (PrusaSlicer filament_type, Cura material_type).
    expect(materialFamilyFromText('PLA')).toBe('pla');
    expect(materialFamilyFromText('PETG')).toBe('petg');
    expect(materialFamilyFromText('FLEX')).toBe('tpu');
    expect(materialFamilyFromText('PC-ABS')).toBe('abs');
    expect(materialFamilyFromText('NYLON')).toBe('pa');
    expect(materialFamilyFromText('PA-CF')).toBe('pa');
    expect(materialFamilyFromText('PC')).toBe('pc');
    expect(materialFamilyFromText('ASA')).toBe('asa');
    expect(materialFamilyFromText('PVA')).toBe('other');
    expect(materialFamilyFromText('')).toBeNull();
  });
});
