/**
 * Inspections of entries: queue the engine off the request thread (lib/jobs), store the report
 * with its headline figures, and read it back for the entrant, the judges and the public pages.
 *
 * Rows are never overwritten by a new upload: each G-code gets its own inspection row, the newest
 * id is the current one. A row left `queued` or `running` by a server that stopped (crash, deploy)
 * is picked up again the next time anyone looks at the entry (resumeInspection).
 */
import { Op } from 'sequelize';
import { Entry, ExtrusionTest, Inspection, StoredFile, TestPiece } from '@/models';
import { enqueue, isQueued, inspectInChild, InspectionRunError, ENGINE_VERSION } from '@/lib/jobs';
import { localPath } from '@/lib/storage';
import type { InspectOptions } from '@/lib/inspection';
import type { Flag } from '@/lib/inspection/types';
import type { SettingKey } from '@/lib/inspection/contract';
import type { RuleResult } from '@/lib/inspection/rules';
import { isMaterialFamily } from '@/lib/inspection/materials';
import { latestFlowLimitMm3s } from '@/lib/machines';
import { flowSeries } from '@/lib/reviews/report';
import { rulesForEntry } from './rules';

const jobKey = (inspectionId: number) => `inspection:${inspectionId}`;

/** The current G-code among an entry's files (any kinds, any order): the newest not replaced. */
export function currentGcodeOf(files: readonly StoredFile[]): StoredFile | null {
  let current: StoredFile | null = null;
  for (const f of files) if (f.kind === 'gcode' && !f.meta?.replacedAt && (!current || f.id > current.id)) current = f;
  return current;
}

/** The entry's current G-code (newest not replaced). */
export async function currentGcode(entryId: number): Promise<StoredFile | null> {
  return currentGcodeOf(await StoredFile.findAll({ where: { entryId, kind: 'gcode' } }));
}

export async function latestInspection(entryId: number): Promise<Inspection | null> {
  // The preview (hundreds of KB) is read only by the review desk's preview route.
  return Inspection.findOne({ where: { entryId }, order: [['id', 'DESC']], attributes: { exclude: ['preview'] } });
}

/** Engine options from the entry, its season and its machine. */
export async function inspectionOptions(entry: Entry, gcodeSha256: string): Promise<InspectOptions> {
  const [rules, piece, limit, duplicate, diameterTest] = await Promise.all([
    rulesForEntry(entry.seasonId, entry.classId),
    TestPiece.findOne({ where: { seasonId: entry.seasonId } }),
    latestFlowLimitMm3s(entry.machineId, entry.materialFamily),
    Entry.findOne({
      where: { gcodeSha256, entrantId: { [Op.ne]: entry.entrantId }, state: { [Op.ne]: 'withdrawn' } },
      order: [['id', 'ASC']],
      attributes: ['id'],
    }),
    ExtrusionTest.findOne({ where: { machineId: entry.machineId, materialFamily: entry.materialFamily }, order: [['testedAt', 'DESC'], ['id', 'DESC']] }),
  ]);
  const testPieceSizeMm = piece ? { x: piece.sizeXMm, y: piece.sizeYMm, z: piece.sizeZMm } : undefined;
  const measured =
    entry.measuredXMm !== null && entry.measuredYMm !== null && entry.measuredZMm !== null
      ? { x: entry.measuredXMm, y: entry.measuredYMm, z: entry.measuredZMm }
      : undefined;
  return {
    // The filament the machine was tested with; otherwise the engine's 1.75 mm default (it warns when the file declares another).
    ...(diameterTest ? { filamentDiameterMm: diameterTest.filamentDiameterMm } : {}),
    ...(isMaterialFamily(entry.materialFamily) ? { material: entry.materialFamily } : {}),
    rules,
    ruleContext: testPieceSizeMm ? { testPieceSizeMm } : {},
    claims: {
      claimedTimeMs: entry.claimedTimeMs,
      ...(limit ? { machineFlowLimitMm3s: limit.limitMm3s } : {}),
      ...(measured ? { measuredDimensionsMm: measured } : {}),
      ...(testPieceSizeMm ? { testPieceSizeMm } : {}),
      ...(duplicate ? { duplicateOfEntry: `#${duplicate.id}` } : {}),
    },
  };
}

/** Counts for the headline columns: blocking = failing blocking rules + blocking flags; advisory = the rest judges should see. */
export function countFindings(rules: RuleResult[], flags: Flag[]) {
  const blocking = rules.filter((r) => r.status === 'fail' && r.rule.severity === 'blocking').length + flags.filter((f) => f.severity === 'blocking').length;
  const advisory =
    rules.filter((r) => (r.status === 'fail' && r.rule.severity === 'advisory') || r.status === 'unknown').length + flags.filter((f) => f.severity === 'advisory').length;
  return { blocking, advisory };
}

async function runInspection(inspectionId: number) {
  const row = await Inspection.findByPk(inspectionId);
  if (!row || row.status === 'done' || row.status === 'failed') return;
  const [entry, file] = await Promise.all([Entry.findByPk(row.entryId), row.storedFileId ? StoredFile.findByPk(row.storedFileId) : null]);
  if (!entry || !file) {
    await row.update({ status: 'failed', error: 'The G-code file of this inspection is gone; upload it again.', finishedAt: new Date() });
    return;
  }
  await row.update({ status: 'running', error: null });
  try {
    const options = await inspectionOptions(entry, file.sha256);
    const { report, preview } = await inspectInChild(localPath(file.storageKey), { ...options, name: file.originalName });
    const ruleResults: RuleResult[] = report.rules ?? [];
    const flags: Flag[] = [...(report.plausibility ?? []), ...report.warnings];
    const { blocking, advisory } = countFindings(ruleResults, flags);
    await row.update({
      status: 'done',
      engineVersion: ENGINE_VERSION,
      report,
      preview,
      ruleResults,
      flags,
      blockingFailures: blocking,
      advisoryFlags: advisory,
      peakFlowMm3s: report.flow.peak_mm3s,
      p95FlowMm3s: report.flow.p95_mm3s,
      estimatedTimeS: report.time.estimated_s,
      layerHeightMm: report.layers.height_mm,
      error: null,
      finishedAt: new Date(),
    });
  } catch (err) {
    const message = err instanceof InspectionRunError ? err.message : 'The inspection failed on our side; try "Inspect again".';
    if (!(err instanceof InspectionRunError)) console.error('inspection', inspectionId, err);
    await row.update({ status: 'failed', error: message, finishedAt: new Date() });
  }
}

export function queueInspection(inspectionId: number) {
  enqueue(jobKey(inspectionId), () => runInspection(inspectionId));
}

/** Creates a fresh inspection row for the entry's current G-code and queues it. */
export async function reinspect(entry: Entry): Promise<Inspection | null> {
  const gcode = await currentGcode(entry.id);
  if (!gcode) return null;
  const row = await Inspection.create({ entryId: entry.id, storedFileId: gcode.id, engineVersion: ENGINE_VERSION, status: 'queued', report: null, peakFlowMm3s: null, p95FlowMm3s: null, estimatedTimeS: null, layerHeightMm: null, error: null, finishedAt: null });
  queueInspection(row.id);
  return row;
}

/** Picks up an inspection that a stopped server left queued or running. */
export async function resumeInspection(row: Inspection | null) {
  if (row && (row.status === 'queued' || row.status === 'running') && !isQueued(jobKey(row.id))) {
    await row.update({ status: 'queued' });
    queueInspection(row.id);
  }
}

/** The stored inspection as the pages show it: rule results, flags, key figures and the flow series. */
export function inspectionJson(row: Inspection) {
  const r = row.report;
  const setting = (k: SettingKey) => r?.settings[k] ?? null;
  return {
    id: row.id,
    status: row.status,
    error: row.error,
    createdAt: row.createdAt.toISOString(),
    finishedAt: row.finishedAt?.toISOString() ?? null,
    fileName: r?.file.name ?? null,
    blockingFailures: row.blockingFailures,
    advisoryFlags: row.advisoryFlags,
    ruleResults: row.ruleResults,
    flags: row.flags,
    figures: {
      peakFlowMm3s: row.peakFlowMm3s,
      p95FlowMm3s: row.p95FlowMm3s,
      meanFlowMm3s: r?.flow.mean_mm3s ?? null,
      estimatedTimeS: row.estimatedTimeS,
      slicerEstimateS: r?.time.slicer_estimate_s ?? null,
      layerHeightMm: row.layerHeightMm,
      firstLayerHeightMm: r?.layers.first_height_mm ?? null,
      layers: r?.layers.count ?? null,
      walls: setting('walls'),
      topLayers: setting('top_layers'),
      bottomLayers: setting('bottom_layers'),
      infillPercent: setting('infill_percent'),
      lineWidthMm: setting('line_width_mm'),
      sizeMm: r?.size_mm ?? null,
      objects: r?.objects ?? null,
      filamentVolumeMm3: r?.filament.volume_mm3 ?? null,
      filamentMassG: r?.filament.mass_g ?? null,
      slicer: r ? (r.slicer.generator ?? r.slicer.dialect) : null,
    },
    flowSeries: r ? flowSeries(r) : null,
  };
}
export type InspectionJson = ReturnType<typeof inspectionJson>;
