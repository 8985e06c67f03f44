/** Everything a judge needs on one screen for one entry. */
import { ContestClass, Entry, ExtrusionTest, Inspection, Machine, Review, Season, StoredFile, TestPiece, User } from '@/models';
import { extrusionTestJson } from '@/lib/machines';
import { auditEvidenceView } from './evidence';
import { reviewableEntry } from './access';
import { latestReinspection } from './reinspection';
import { dimensionalDeviation } from './checklist';
import { inspectionDiff } from './diff';
import { asFlags } from './flags';
import { flowSeries, headline, settingsRows } from './report';
import { requiredVerifications, roundOpenedAt, roundVerifiers } from './round';

/** Link to a file of the entry through the judges' file route (checks access, audits full-size views). */
export const judgeFileUrl = (entryId: number, fileId: number, opts: { thumb?: boolean } = {}) =>
  `/api/judging/entries/${entryId}/files/${fileId}${opts.thumb ? '?thumb=1' : ''}`;

/** The thumbnail stored for a photo: a `thumbnail` file whose meta names the photo. */
function thumbnailOf(photo: StoredFile, thumbs: StoredFile[]): StoredFile | null {
  return (
    thumbs.find((t) => {
      const m = t.meta ?? {};
      return [m.photoId, m.sourceId, m.photoFileId, m.of].some((v) => Number(v) === photo.id);
    }) ?? (typeof photo.meta?.thumbnailId === 'number' ? (thumbs.find((t) => t.id === photo.meta.thumbnailId) ?? null) : null)
  );
}

function snapshot(i: Inspection) {
  return {
    id: i.id,
    engineVersion: i.engineVersion,
    createdAt: i.createdAt,
    blockingFailures: i.blockingFailures,
    advisoryFlags: i.advisoryFlags,
    peakFlowMm3s: i.peakFlowMm3s,
    p95FlowMm3s: i.p95FlowMm3s,
    estimatedTimeS: i.estimatedTimeS,
    layerHeightMm: i.layerHeightMm,
    ruleResults: i.ruleResults,
    flags: i.flags,
  };
}

/**
 * The review screen's data. Opening it is a view of private evidence (photos, evidence link,
 * measured part), so it is audited.
 */
export async function entryReview(judgeId: number, entryId: number, meta: { ip?: string | null } = {}) {
  const entry = await reviewableEntry(judgeId, entryId);
  const [season, cls, entrant, machine, files, inspections, reviews, testPiece] = await Promise.all([
    Season.findByPk(entry.seasonId),
    ContestClass.findByPk(entry.classId),
    User.findByPk(entry.entrantId, { attributes: ['id', 'name'] }),
    Machine.findByPk(entry.machineId),
    StoredFile.findAll({ where: { entryId: entry.id }, order: [['id', 'ASC']] }),
    Inspection.findAll({ where: { entryId: entry.id }, order: [['id', 'DESC']], limit: 20 }),
    Review.findAll({ where: { entryId: entry.id }, order: [['id', 'ASC']], include: [{ model: User, as: 'judge', attributes: ['id', 'name'] }] }),
    TestPiece.findOne({ where: { seasonId: entry.seasonId } }),
  ]);
  const [tests, reinspection] = await Promise.all([
    machine ? ExtrusionTest.findAll({ where: { machineId: machine.id }, order: [['testedAt', 'DESC']] }) : Promise.resolve([] as ExtrusionTest[]),
    latestReinspection(entry.id),
  ]);
  await auditEvidenceView(judgeId, entry.id, 'review', { ip: meta.ip });

  const photos = files.filter((f) => f.kind === 'photo');
  const thumbs = files.filter((f) => f.kind === 'thumbnail');
  // The current G-code: the newest one not replaced by a later upload.
  const gcode = [...files].reverse().find((f) => f.kind === 'gcode' && !f.meta?.replacedAt) ?? null;
  // Judges work from the newest finished inspection; a newer one still queued or running (a
  // re-inspection) or failed is shown as a note, and "what changed" compares the two newest finished ones.
  const done = inspections.filter((i) => i.status === 'done');
  const newest = inspections[0] ?? null;
  const latest = done[0] ?? newest;
  const previous = done[1] ?? null;
  const pending = newest && newest !== latest ? { id: newest.id, status: newest.status, error: newest.error, createdAt: newest.createdAt.toISOString() } : null;
  const verifiers = roundVerifiers(reviews, roundOpenedAt(entry));
  const reference = testPiece ? { x: testPiece.sizeXMm, y: testPiece.sizeYMm, z: testPiece.sizeZMm } : null;
  const report = latest?.report ?? null;
  const head = headline(report);

  return {
    entry: {
      id: entry.id,
      state: entry.state,
      claimedTimeMs: entry.claimedTimeMs,
      evidenceUrl: entry.evidenceUrl,
      evidenceLink: entry.evidenceUrl ? `/api/judging/entries/${entry.id}/evidence` : null,
      materialFamily: entry.materialFamily,
      materialName: entry.materialName,
      nozzleMm: entry.nozzleMm,
      notes: entry.notes,
      submittedAt: entry.submittedAt?.toISOString() ?? null,
      decidedAt: entry.decidedAt?.toISOString() ?? null,
      measuredMm: { x: entry.measuredXMm, y: entry.measuredYMm, z: entry.measuredZMm },
    },
    season: season && {
      id: season.id,
      slug: season.slug,
      name: season.name,
      state: season.state,
      timingConvention: season.timingConvention,
      verificationsRequired: requiredVerifications(season.verificationsRequired),
    },
    className: cls?.name ?? '',
    entrant: { id: entrant?.id ?? entry.entrantId, name: entrant?.name ?? '' },
    testPiece: testPiece && { name: testPiece.name, sizeMm: reference! },
    dimensions: dimensionalDeviation({ x: entry.measuredXMm, y: entry.measuredYMm, z: entry.measuredZMm }, reference),
    machine: machine && {
      name: machine.name,
      motionSystem: machine.motionSystem,
      buildMm: { x: machine.buildXMm, y: machine.buildYMm, z: machine.buildZMm },
      nozzleMm: machine.nozzleMm,
      hotend: machine.hotend,
      extruder: machine.extruder,
      firmware: machine.firmware,
      maxAccelMmS2: machine.maxAccelMmS2,
      maxSpeedMms: machine.maxSpeedMms,
      modifications: machine.modifications,
      isModified: machine.isModified,
    },
    extrusionTests: tests.map((t) => ({ ...extrusionTestJson(t, machine ? { maxSpeedMms: machine.maxSpeedMms } : null), matchesEntryMaterial: t.materialFamily === entry.materialFamily })),
    photos: photos.map((p) => {
      const t = thumbnailOf(p, thumbs);
      return {
        id: p.id,
        name: p.originalName,
        capturedAt: typeof p.meta?.capturedAt === 'string' ? p.meta.capturedAt : null,
        url: judgeFileUrl(entry.id, p.id),
        thumbUrl: t ? judgeFileUrl(entry.id, t.id, { thumb: true }) : judgeFileUrl(entry.id, p.id, { thumb: true }),
      };
    }),
    gcode: gcode && { id: gcode.id, name: gcode.originalName, sizeBytes: gcode.sizeBytes, sha256: gcode.sha256, url: judgeFileUrl(entry.id, gcode.id) },
    inspection: latest && {
      id: latest.id,
      status: latest.status,
      engineVersion: latest.engineVersion,
      error: latest.error,
      finishedAt: latest.finishedAt?.toISOString() ?? null,
      headline: { ...head, estimatedS: latest.estimatedTimeS ?? head.estimatedS, peakFlowMm3s: latest.peakFlowMm3s ?? head.peakFlowMm3s, p95FlowMm3s: latest.p95FlowMm3s ?? head.p95FlowMm3s },
      ruleResults: latest.ruleResults,
      flags: asFlags(latest.flags),
      settings: settingsRows(report),
      flowSeries: flowSeries(report),
      previewUrl: gcode ? `/api/judging/entries/${entry.id}/preview` : null,
    },
    pendingInspection: pending,
    /** The latest re-inspection's outcome; `reopened` when it took a verified entry out of the standings. */
    reinspection,
    changes: latest && previous && latest.status === 'done' ? inspectionDiff(snapshot(previous), snapshot(latest)) : null,
    reviews: reviews.map((r) => ({
      id: r.id,
      judge: (r as unknown as { judge: User | null }).judge?.name ?? '',
      judgeId: r.judgeId,
      decision: r.decision,
      reasonCodes: r.reasonCodes,
      note: r.note,
      checklist: r.checklist,
      createdAt: r.createdAt.toISOString(),
    })),
    verifications: { count: verifiers.length, required: requiredVerifications(season?.verificationsRequired), byMe: verifiers.includes(judgeId) },
  };
}
export type EntryReview = Awaited<ReturnType<typeof entryReview>>;
