/**
 * Inspections of entries: queue the engine off the request thread (lib/jobs), store the report
 * with its headline figures, and read it back for the entrant, the judges and the public pages.
 *
 * Rows are never overwritten by a new upload: each G-code gets its own inspection row, the newest
 * id is the current one. The row is also the job record (lib/jobs): at most one queued row per
 * entry (a unique index), and a row left `queued` or `running` by a server that stopped is resumed
 * when the next server starts (instrumentation.ts), never by a page read.
 */
import { Op, type Transaction } from 'sequelize';
import { AuditEvent, Entry, ExtrusionTest, Inspection, StoredFile, TestPiece } from '@/models';
import { inspectInPool, InspectionRunError, ENGINE_VERSION, wakeJobs, jobSettings, type JobClaim } from '@/lib/jobs';
import { sqlInspectionQueue } from '@/lib/jobs/sqlQueue';
import { getSequelize } from '@/lib/db';
import { tooMany } from '@/lib/errors';
import type { InspectOptions, StoredInspectionJson } from '@/lib/inspection';
import { isMaterialFamily } from '@/lib/inspection/materials';
import { latestFlowLimitMm3s } from '@/lib/machines';
import { rulesForEntry } from './rules';
import { reportColumns } from './inspectionView';
import { duplicateClaim, findDuplicate } from './duplicates';
import { afterInspectionStored } from '@/lib/reviews/reinspection';

export { countFindings, inspectionJson, type InspectionJson } from './inspectionView';

/** The current G-code among an entry's files (any kinds, any order): the newest not replaced. */
export function currentGcodeOf(files: readonly StoredFile[]): StoredFile | null {
  let current: StoredFile | null = null;
  for (const f of files) if (f.kind === 'gcode' && !f.meta?.replacedAt && (!current || f.id > current.id)) current = f;
  return current;
}

/** The entry's current G-code (newest not replaced). */
export async function currentGcode(entryId: number, transaction?: Transaction): Promise<StoredFile | null> {
  return currentGcodeOf(await StoredFile.findAll({ where: { entryId, kind: 'gcode' }, transaction }));
}

export async function latestInspection(entryId: number, transaction?: Transaction): Promise<Inspection | null> {
  // The preview (hundreds of KB) is read only by the review desk's preview route.
  return Inspection.findOne({ where: { entryId }, order: [['id', 'DESC']], attributes: { exclude: ['preview'] }, transaction });
}

/** Engine options from the entry, its season and its machine. */
export async function inspectionOptions(entry: Entry, gcodeSha256: string): Promise<InspectOptions> {
  const [rules, piece, limit, duplicate, diameterTest] = await Promise.all([
    rulesForEntry(entry.seasonId, entry.classId),
    TestPiece.findOne({ where: { seasonId: entry.seasonId } }),
    latestFlowLimitMm3s(entry.machineId, entry.materialFamily),
    findDuplicate(entry, gcodeSha256),
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
      ...(duplicate ? { duplicateOfEntry: duplicateClaim(duplicate) } : {}),
    },
  };
}

/**
 * Runs one claimed inspection job (lib/jobs runner): the engine in the worker pool, then the
 * report stored — only while the job is still ours (status running, same attempt), so a runner
 * whose lease was taken over writes nothing.
 */
export async function runInspectionJob(claim: JobClaim) {
  const settings = jobSettings();
  const queue = sqlInspectionQueue(settings);
  const row = await Inspection.findByPk(claim.id);
  if (!row || row.status !== 'running' || row.attempts !== claim.attempt) return;
  const [entry, file] = await Promise.all([Entry.findByPk(row.entryId), row.storedFileId ? StoredFile.findByPk(row.storedFileId) : null]);
  if (!entry || !file) {
    await queue.fail(claim, 'The G-code file of this inspection is gone; upload it again.');
    return;
  }
  try {
    const options = await inspectionOptions(entry, file.sha256);
    const stored = await inspectInPool(file.storageKey, { ...options, name: file.originalName }, settings);
    await runInspection(row, claim, stored);
  } catch (err) {
    if (!(err instanceof InspectionRunError)) throw err;
    if (err.kind === 'crashed') await queue.release(claim, err.message, new Date());
    else await queue.fail(claim, err.message);
  }
}

/** Stores a finished report (checked against the contract by the pool) with its headline figures and the preview, if the job is still this claim's. */
async function runInspection(row: Inspection, claim: JobClaim, { report, preview }: StoredInspectionJson) {
  const [n] = await Inspection.update(
    {
      status: 'done',
      engineVersion: ENGINE_VERSION,
      report,
      preview,
      ...reportColumns(report),
      error: null,
      leaseUntil: null,
      finishedAt: new Date(),
    },
    { where: { id: row.id, status: 'running', attempts: claim.attempt } },
  );
  // What a re-inspection changes for the entry (a verified entry failing a tightened rule, …).
  if (n === 1) await afterInspectionStored(row.id);
}

/** Hands queued rows to the job runner (call after the transaction that created them committed). */
export function queueInspection() {
  wakeJobs();
}

/**
 * Queues an inspection of `storedFileId` for the entry, inside the caller's transaction: an older
 * row still queued for the entry (an earlier file, not started) fails with a sentence first, so the
 * entry keeps one queued inspection (the unique index inspections_one_queued_per_entry holds it).
 * A row already queued for the same file is returned as it is.
 */
export async function queueInspectionRow(entryId: number, storedFileId: number, transaction?: Transaction): Promise<{ row: Inspection; created: boolean }> {
  const queued = await Inspection.findOne({ where: { entryId, status: 'queued' }, transaction });
  if (queued && queued.storedFileId === storedFileId) return { row: queued, created: false };
  if (queued) await queued.update({ status: 'failed', error: 'A newer G-code was uploaded before this inspection started.', finishedAt: new Date() }, { transaction });
  const row = await Inspection.create(
    { entryId, storedFileId, engineVersion: ENGINE_VERSION, status: 'queued', report: null, peakFlowMm3s: null, p95FlowMm3s: null, estimatedTimeS: null, layerHeightMm: null, error: null, finishedAt: null },
    { transaction },
  );
  return { row, created: true };
}

/** Throws 429 with a sentence when the entrant asked for too many re-inspections lately (read inside the caller's transaction). */
export async function checkReinspectRate(entrantId: number, transaction?: Transaction, now = new Date()) {
  const { reinspectLimit, reinspectWindowMs } = jobSettings();
  const since = new Date(now.getTime() - reinspectWindowMs);
  const recent = await AuditEvent.findAll({ where: { actorId: entrantId, action: 'entry.reinspected', createdAt: { [Op.gt]: since } }, attributes: ['createdAt'], order: [['createdAt', 'ASC']], transaction });
  if (recent.length < reinspectLimit) return;
  const waitMin = Math.max(1, Math.ceil((recent[0].createdAt.getTime() + reinspectWindowMs - now.getTime()) / 60_000));
  throw tooMany(
    `You asked for ${recent.length} re-inspections in the last ${Math.round(reinspectWindowMs / 60_000)} minutes, the most we run for one entrant; try again in ${waitMin} minute${waitMin === 1 ? '' : 's'}.`,
  );
}

/** A fresh inspection of the entry's current G-code, queued (or the one already queued for it). */
export async function reinspect(entry: Entry, transaction?: Transaction): Promise<Inspection | null> {
  const gcode = await currentGcode(entry.id, transaction);
  if (!gcode) return null;
  if (transaction) {
    // Inside the caller's transaction; handed to the runner once it commits.
    const { row } = await queueInspectionRow(entry.id, gcode.id, transaction);
    transaction.afterCommit(() => queueInspection());
    return row;
  }
  const { row } = await getSequelize().transaction((t) => queueInspectionRow(entry.id, gcode.id, t));
  queueInspection();
  return row;
}
