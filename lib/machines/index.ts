/** Entrants' machines and their extrusion-limit tests. Others' machines answer 404, never 403. */
import { ExtrusionTest, Machine } from '@/models';
import { notFound } from '@/lib/errors';
import { audit } from '@/lib/audit';
import { parseInput } from '@/lib/http';
import { QueryTypes } from 'sequelize';
import { getSequelize } from '@/lib/db';
import { computeExtrusionLimit, ExtrusionTestSchema, type ExtrusionResult, type MachineSpeedLimits } from '@/lib/extrusion';
import type { MaterialFamily } from '@/lib/inspection/materials';
import type { MachineInput } from './schema';

export { MachineSchema, type MachineInput } from './schema';

export function machineJson(m: Machine) {
  return {
    id: m.id, name: m.name, motionSystem: m.motionSystem, buildXMm: m.buildXMm, buildYMm: m.buildYMm, buildZMm: m.buildZMm,
    nozzleMm: m.nozzleMm, hotend: m.hotend, extruder: m.extruder, firmware: m.firmware, maxAccelMmS2: m.maxAccelMmS2,
    maxSpeedMms: m.maxSpeedMms, modifications: m.modifications, isModified: m.isModified, retiredAt: m.retiredAt?.toISOString() ?? null,
  };
}
export type MachineJson = ReturnType<typeof machineJson>;

export async function listMachines(ownerId: number) {
  const rows = await Machine.findAll({ where: { ownerId }, order: [['retiredAt', 'ASC'], ['name', 'ASC']] });
  return rows.map(machineJson);
}

/** The caller's machine or a 404 (also for other people's machines: their existence is private). */
export async function ownMachine(ownerId: number, id: number): Promise<Machine> {
  const m = Number.isInteger(id) ? await Machine.findOne({ where: { id, ownerId } }) : null;
  if (!m) throw notFound('No such machine.');
  return m;
}

export async function createMachine(ownerId: number, input: MachineInput) {
  const m = await Machine.create({ ...input, ownerId, retiredAt: null });
  await audit('machine.created', { type: 'machine', id: m.id }, { actorId: ownerId, details: { name: m.name } });
  return machineJson(m);
}

export async function updateMachine(ownerId: number, id: number, input: MachineInput) {
  const m = await ownMachine(ownerId, id);
  await m.update(input);
  await audit('machine.updated', { type: 'machine', id: m.id }, { actorId: ownerId });
  return machineJson(m);
}

/** Retiring keeps the machine (its entries refer to it) but hides it from new entries. */
export async function retireMachine(ownerId: number, id: number, retired = true) {
  const m = await ownMachine(ownerId, id);
  await m.update({ retiredAt: retired ? new Date() : null });
  await audit('machine.retired', { type: 'machine', id: m.id }, { actorId: ownerId, details: { retired } });
  return machineJson(m);
}

/** A test's figures; with the machine's limits, its speed ceilings are capped by them. */
export function extrusionTestJson(t: ExtrusionTest, machine?: MachineSpeedLimits | null) {
  const result: ExtrusionResult = computeExtrusionLimit({
    machine,
    materialFamily: t.materialFamily as MaterialFamily,
    filamentDiameterMm: t.filamentDiameterMm,
    sampleLengthMm: t.sampleLengthMm,
    referenceMassG: t.referenceMassG,
    thresholdPercent: t.thresholdPercent,
    steps: t.steps,
  });
  return {
    id: t.id, machineId: t.machineId, materialFamily: t.materialFamily, materialName: t.materialName,
    filamentDiameterMm: t.filamentDiameterMm, sampleLengthMm: t.sampleLengthMm, testedAt: t.testedAt.toISOString(),
    ...result,
  };
}
export type ExtrusionTestJson = ReturnType<typeof extrusionTestJson>;

/** A machine's tests, newest first; the caller has already checked the machine is theirs. */
export async function extrusionTestsOf(machineId: number) {
  const [machine, rows] = await Promise.all([
    Machine.findByPk(machineId, { attributes: ['id', 'maxSpeedMms'] }),
    ExtrusionTest.findAll({ where: { machineId }, order: [['testedAt', 'DESC'], ['id', 'DESC']] }),
  ]);
  return rows.map((t) => extrusionTestJson(t, machine ? { maxSpeedMms: machine.maxSpeedMms } : null));
}

export async function listExtrusionTests(ownerId: number, machineId: number) {
  await ownMachine(ownerId, machineId);
  return extrusionTestsOf(machineId);
}

export async function recordExtrusionTest(ownerId: number, machineId: number, raw: unknown) {
  const input = parseInput(ExtrusionTestSchema, raw);
  const machine = await ownMachine(ownerId, machineId);
  const result = computeExtrusionLimit(input);
  const t = await ExtrusionTest.create({
    machineId,
    materialFamily: input.materialFamily,
    materialName: input.materialName,
    filamentDiameterMm: input.filamentDiameterMm,
    sampleLengthMm: input.sampleLengthMm,
    // The weighed reference, or the computed mass when none was weighed (the column is required).
    referenceMassG: result.referenceMassG,
    thresholdPercent: input.thresholdPercent,
    steps: input.steps,
    limitFlowMm3s: result.limitFlowMm3s,
    testedAt: new Date(),
  });
  await audit('machine.extrusion_test_recorded', { type: 'machine', id: machineId }, { actorId: ownerId, details: { testId: t.id, limitFlowMm3s: result.limitFlowMm3s } });
  return extrusionTestJson(t, { maxSpeedMms: machine.maxSpeedMms });
}

/** The machine's latest extrusion-limit result for a material family (feeds the plausibility checks). */
export async function latestFlowLimitMm3s(machineId: number, materialFamily: string): Promise<{ limitMm3s: number; testId: number } | null> {
  const t = await ExtrusionTest.findOne({ where: { machineId, materialFamily }, order: [['testedAt', 'DESC'], ['id', 'DESC']] });
  return t && t.limitFlowMm3s !== null ? { limitMm3s: t.limitFlowMm3s, testId: t.id } : null;
}

/** One material family's measured flow limits of a machine, as the public machine page shows them. */
export interface PublicFlowLimit {
  materialFamily: string;
  /** The latest extrusion-limit test's limit (null: no test, or no step passed). */
  testedLimitMm3s: number | null;
  testedAt: string | null;
  thresholdPercent: number | null;
  /** Highest commanded-flow figures among this machine's verified entries (Hotlap's inspection of each). */
  verifiedEntries: number;
  verifiedPeakFlowMm3s: number | null;
  verifiedP95FlowMm3s: number | null;
}

/**
 * A machine's measured flow limits per material family, for the public machine page: the owner's
 * latest extrusion-limit test, and the highest flows Hotlap measured in the machine's verified
 * entries (their latest finished inspection). Only verified entries of published seasons count,
 * like every other public figure.
 */
export async function publicFlowLimits(machineId: number): Promise<{ maxSpeedMms: number | null; maxAccelMmS2: number | null; limits: PublicFlowLimit[] }> {
  const sequelize = getSequelize();
  const [machine, tests, verified] = await Promise.all([
    Machine.findByPk(machineId, { attributes: ['id', 'maxSpeedMms', 'maxAccelMmS2'] }),
    ExtrusionTest.findAll({ where: { machineId }, order: [['testedAt', 'DESC'], ['id', 'DESC']] }),
    sequelize.query<{ material_family: string; n: number; peak: number | null; p95: number | null }>(
      `SELECT e.material_family, COUNT(*) AS n, MAX(i.peak_flow_mm3s) AS peak, MAX(i.p95_flow_mm3s) AS p95
       FROM entries e JOIN seasons s ON s.id = e.season_id
       LEFT JOIN inspections i ON i.id = (SELECT i2.id FROM inspections i2 WHERE i2.entry_id = e.id AND i2.status = 'done' ORDER BY i2.created_at DESC, i2.id DESC LIMIT 1)
       WHERE e.machine_id = ? AND e.state = 'verified' AND s.state <> 'draft'
       GROUP BY e.material_family`,
      { replacements: [machineId], type: QueryTypes.SELECT },
    ),
  ]);
  const out = new Map<string, PublicFlowLimit>();
  const row = (family: string) => {
    let r = out.get(family);
    if (!r) out.set(family, (r = { materialFamily: family, testedLimitMm3s: null, testedAt: null, thresholdPercent: null, verifiedEntries: 0, verifiedPeakFlowMm3s: null, verifiedP95FlowMm3s: null }));
    return r;
  };
  for (const t of tests) {
    const r = row(t.materialFamily);
    if (r.testedAt !== null) continue; // newest first: keep the latest test per family
    r.testedLimitMm3s = t.limitFlowMm3s;
    r.testedAt = t.testedAt.toISOString();
    r.thresholdPercent = t.thresholdPercent;
  }
  for (const v of verified) {
    const r = row(v.material_family);
    r.verifiedEntries = Number(v.n);
    r.verifiedPeakFlowMm3s = v.peak === null ? null : Number(v.peak);
    r.verifiedP95FlowMm3s = v.p95 === null ? null : Number(v.p95);
  }
  return {
    maxSpeedMms: machine?.maxSpeedMms ?? null,
    maxAccelMmS2: machine?.maxAccelMmS2 ?? null,
    limits: [...out.values()].sort((a, b) => a.materialFamily.localeCompare(b.materialFamily)),
  };
}
