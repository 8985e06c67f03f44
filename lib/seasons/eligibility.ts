/**
 * A class's eligibility in one line of plain words (organizer list, public season and rulebook
 * pages). The build-volume band is the machine's longest build axis, as lib/entries/eligibility
 * checks it. Client-safe.
 */
import { MOTION_SYSTEM_LABELS, type MotionSystem } from '@/lib/domain';
import { MATERIALS, type MaterialFamily } from '@/lib/inspection/materials';

export interface EligibilityFields {
  nozzleDiametersMm: number[];
  nozzleMinMm: number | null;
  materialFamilies: string[];
  motionSystems: string[];
  buildVolumeMinMm: number | null;
  buildVolumeMaxMm: number | null;
  modification: string;
}

export function eligibilityText(c: EligibilityFields): string {
  const parts: string[] = [];
  if (c.nozzleDiametersMm.length) parts.push(`nozzle ${c.nozzleDiametersMm.join(' / ')} mm`);
  else if (c.nozzleMinMm !== null) parts.push(`nozzle ${c.nozzleMinMm} mm and wider`);
  else parts.push('any nozzle');
  if (c.materialFamilies.length) parts.push(c.materialFamilies.map((f) => MATERIALS[f as MaterialFamily]?.label ?? f).join(' or '));
  if (c.motionSystems.length) parts.push(c.motionSystems.map((m) => MOTION_SYSTEM_LABELS[m as MotionSystem] ?? m).join(' or '));
  if (c.buildVolumeMinMm !== null && c.buildVolumeMaxMm !== null) parts.push(`longest build axis ${c.buildVolumeMinMm}–${c.buildVolumeMaxMm} mm`);
  else if (c.buildVolumeMaxMm !== null) parts.push(`longest build axis up to ${c.buildVolumeMaxMm} mm`);
  else if (c.buildVolumeMinMm !== null) parts.push(`longest build axis ${c.buildVolumeMinMm} mm or more`);
  if (c.modification === 'stock') parts.push('stock machines only');
  if (c.modification === 'modified') parts.push('modified machines only');
  const s = parts.join(' · ');
  return s.charAt(0).toUpperCase() + s.slice(1);
}
