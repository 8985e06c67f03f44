/**
 * Material families known to the inspection engine: density (for filament mass) and the safety
 * caution a family carries. One list, imported by the CLI, the report, the forms and the tests.
 *
 * Densities are the values in the filament profile bundle shipped with PrusaSlicer 2.5.0
 * (Debian package prusa-slicer 2.5.0+dfsg-4, file /usr/share/PrusaSlicer/profiles/PrusaResearch.ini,
 * key `filament_density`, g/cm³). The line of each value is cited beside it so a reader can check
 * it; tests/unit/inspection/materials.test.ts re-reads that file when it is installed.
 */
import { z } from 'zod';

/** Cross-section of round filament of diameter d: π (d/2)², mm² (1.75 mm → 2.405 mm²). */
export function filamentAreaMm2(diameterMm: number): number {
  return Math.PI * (diameterMm / 2) * (diameterMm / 2);
}

export const MATERIAL_FAMILIES = ['pla', 'petg', 'abs', 'asa', 'tpu', 'pa', 'pc', 'other'] as const;
export type MaterialFamily = (typeof MATERIAL_FAMILIES)[number];

export const MaterialFamilySchema = z.enum(MATERIAL_FAMILIES, {
  error: () => `Material must be one of: ${MATERIAL_FAMILIES.join(', ')}.`,
});

export interface MaterialInfo {
  family: MaterialFamily;
  label: string;
  densityGcm3: number;
  /** Where the density comes from. */
  densitySource: string;
  /** ABS and ASA release styrene when printed: the forms show a ventilation caution. */
  styreneBearing: boolean;
}

const PROFILE_BUNDLE = 'PrusaSlicer 2.5.0 profile bundle PrusaResearch.ini';

export const MATERIALS: Readonly<Record<MaterialFamily, MaterialInfo>> = {
  // [filament:Generic PLA], PrusaResearch.ini line 2704: filament_density = 1.24
  pla: { family: 'pla', label: 'PLA', densityGcm3: 1.24, densitySource: `${PROFILE_BUNDLE}, line 2704 (generic PLA)`, styreneBearing: false },
  // [filament:Generic PETG], line 2157: filament_density = 1.27
  petg: { family: 'petg', label: 'PETG', densityGcm3: 1.27, densitySource: `${PROFILE_BUNDLE}, line 2157 (generic PETG)`, styreneBearing: false },
  // [filament:Generic ABS], line 2119: filament_density = 1.04
  abs: { family: 'abs', label: 'ABS', densityGcm3: 1.04, densitySource: `${PROFILE_BUNDLE}, line 2119 (generic ABS)`, styreneBearing: true },
  // An ASA profile (filament_type = ASA at line 1988), line 1974: filament_density = 1.07;
  // 13 of the 14 ASA profiles in the bundle give 1.07.
  asa: { family: 'asa', label: 'ASA', densityGcm3: 1.07, densitySource: `${PROFILE_BUNDLE}, line 1974 (ASA profile)`, styreneBearing: true },
  // [filament:Generic FLEX] (the bundle's generic flexible, i.e. TPU), line 2804: filament_density = 1.22
  tpu: { family: 'tpu', label: 'TPU (flexible)', densityGcm3: 1.22, densitySource: `${PROFILE_BUNDLE}, line 2804 (generic FLEX)`, styreneBearing: false },
  // An unfilled PA profile (filament_type = PA at line 3033), line 3025: filament_density = 1.1
  pa: { family: 'pa', label: 'PA (nylon)', densityGcm3: 1.1, densitySource: `${PROFILE_BUNDLE}, line 3025 (unfilled PA profile)`, styreneBearing: false },
  // A PC profile (filament_type = PC at line 3054), line 3053: filament_density = 1.2
  pc: { family: 'pc', label: 'PC', densityGcm3: 1.2, densitySource: `${PROFILE_BUNDLE}, line 3053 (PC profile)`, styreneBearing: false },
  // Unknown material: assume PLA's density, the most common contest material; the report says so.
  other: { family: 'other', label: 'Other', densityGcm3: 1.24, densitySource: 'assumed equal to PLA (no family given)', styreneBearing: false },
};

export const DEFAULT_MATERIAL_FAMILY: MaterialFamily = 'pla';

export function densityGcm3(family: MaterialFamily): number {
  return (MATERIALS[family] ?? MATERIALS.other).densityGcm3;
}

export function isMaterialFamily(text: string): text is MaterialFamily {
  return (MATERIAL_FAMILIES as readonly string[]).includes(text);
}

/** The caution the forms and the report show for a family, or null when it has none beyond the general ones. */
export function materialCaution(family: MaterialFamily): string | null {
  return MATERIALS[family]?.styreneBearing
    ? `${MATERIALS[family].label} releases styrene while printing: ventilate the room or use an enclosure with filtration.`
    : null;
}

/**
 * Map a slicer's filament type text ("PLA", "PETG", "FLEX", "NYLON", "PA-CF", "PC-ABS"…) to a family.
 * Returns null for an empty string; unrecognised text maps to 'other'.
 */
export function materialFamilyFromText(text: string | null | undefined): MaterialFamily | null {
  if (!text) return null;
  const t = text.trim().toUpperCase().replace(/^"|"$/g, '');
  if (t === '') return null;
  // Order matters: "PC-ABS" and "ABS" carry styrene, so any ABS mention wins over PC.
  if (t.includes('ASA')) return 'asa';
  if (t.includes('ABS')) return 'abs';
  if (t.startsWith('PETG') || t === 'PET' || t.startsWith('PET-') || t.startsWith('PET ') || t === 'CPE') return 'petg';
  if (t.startsWith('PLA')) return 'pla';
  if (t.startsWith('TPU') || t === 'FLEX' || t.startsWith('TPE')) return 'tpu';
  if (t.startsWith('PA') || t.includes('NYLON')) return 'pa';
  if (t.startsWith('PC')) return 'pc';
  return 'other';
}
