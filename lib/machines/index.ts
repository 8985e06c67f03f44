/** Entrants' machines and their extrusion-limit tests. Others' machines answer 404, never 403. */
import { ExtrusionTest, Machine } from '@/models';
import { notFound } from '@/lib/errors';
import { audit } from '@/lib/audit';
import { parseInput } from '@/lib/http';
import { computeExtrusionLimit, ExtrusionTestSchema, type ExtrusionResult } from '@/lib/extrusion';
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

export function extrusionTestJson(t: ExtrusionTest) {
  const result: ExtrusionResult = computeExtrusionLimit({
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
  const rows = await ExtrusionTest.findAll({ where: { machineId }, order: [['testedAt', 'DESC'], ['id', 'DESC']] });
  return rows.map(extrusionTestJson);
}

export async function listExtrusionTests(ownerId: number, machineId: number) {
  await ownMachine(ownerId, machineId);
  return extrusionTestsOf(machineId);
}

export async function recordExtrusionTest(ownerId: number, machineId: number, raw: unknown) {
  await ownMachine(ownerId, machineId);
  const input = parseInput(ExtrusionTestSchema, raw);
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
  return extrusionTestJson(t);
}

/** The machine's latest extrusion-limit result for a material family (feeds the plausibility checks). */
export async function latestFlowLimitMm3s(machineId: number, materialFamily: string): Promise<{ limitMm3s: number; testId: number } | null> {
  const t = await ExtrusionTest.findOne({ where: { machineId, materialFamily }, order: [['testedAt', 'DESC'], ['id', 'DESC']] });
  return t && t.limitFlowMm3s !== null ? { limitMm3s: t.limitFlowMm3s, testId: t.id } : null;
}
