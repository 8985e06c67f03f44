/** Which classes a machine may enter. Framework-free: plain objects in, sentences out. */
import { MOTION_SYSTEM_LABELS, type MotionSystem } from '@/lib/domain';
import { MATERIALS, type MaterialFamily } from '@/lib/inspection/materials';

export interface ClassRules {
  nozzleDiametersMm: number[];
  nozzleMinMm: number | null;
  materialFamilies: string[];
  motionSystems: MotionSystem[];
  buildVolumeMinMm: number | null;
  buildVolumeMaxMm: number | null;
  modification: 'stock' | 'modified' | 'any';
}

export interface MachineSpec {
  nozzleMm: number;
  motionSystem: MotionSystem;
  buildXMm: number;
  buildYMm: number;
  buildZMm: number;
  isModified: boolean;
}

/** Nozzle sizes are compared to 0.01 mm: 0.40 and 0.4 are the same nozzle. */
const sameMm = (a: number, b: number) => Math.abs(a - b) < 0.005;

/** Reasons the entry cannot compete in the class; empty = eligible. The band is the longest build axis. */
export function classEligibility(c: ClassRules, m: MachineSpec, nozzleMm: number, material: string | null): string[] {
  const why: string[] = [];
  if (c.nozzleDiametersMm.length && !c.nozzleDiametersMm.some((d) => sameMm(d, nozzleMm)))
    why.push(`This class is for ${c.nozzleDiametersMm.join(' / ')} mm nozzles; the entry uses ${nozzleMm} mm.`);
  if (c.nozzleMinMm !== null && nozzleMm < c.nozzleMinMm - 0.005) why.push(`This class is for nozzles of ${c.nozzleMinMm} mm or wider; the entry uses ${nozzleMm} mm.`);
  if (c.motionSystems.length && !c.motionSystems.includes(m.motionSystem))
    why.push(`This class is for ${c.motionSystems.map((s) => MOTION_SYSTEM_LABELS[s]).join(' or ')} machines; this machine is ${MOTION_SYSTEM_LABELS[m.motionSystem]}.`);
  const longest = Math.max(m.buildXMm, m.buildYMm, m.buildZMm);
  if (c.buildVolumeMaxMm !== null && longest > c.buildVolumeMaxMm) why.push(`This class is for machines whose longest build axis is at most ${c.buildVolumeMaxMm} mm; this one has ${longest} mm.`);
  if (c.buildVolumeMinMm !== null && longest < c.buildVolumeMinMm) why.push(`This class is for machines whose longest build axis is at least ${c.buildVolumeMinMm} mm; this one has ${longest} mm.`);
  if (material && c.materialFamilies.length && !c.materialFamilies.includes(material))
    why.push(`This class is for ${c.materialFamilies.map((f) => MATERIALS[f as MaterialFamily]?.label ?? f).join(' or ')}.`);
  if (c.modification === 'stock' && m.isModified) why.push('This class is for stock machines; this machine is marked as modified.');
  if (c.modification === 'modified' && !m.isModified) why.push('This class is for modified machines; this machine is marked as stock.');
  return why;
}
