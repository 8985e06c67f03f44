/**
 * Entries from the entrant's side: create a draft with its files (one upload), replace files,
 * submit, withdraw, and read an entry with its inspection and review history.
 *
 * Nothing is lost: an upload is checked (fields, season, class, machine, file types, photos)
 * before anything is written; entry, files and inspection row are then created in one
 * transaction, and files moved into storage are removed again if it rolls back.
 */
import { Op, literal, type Transaction } from 'sequelize';
import { ContestClass, Entry, Inspection, Machine, Review, Season, StoredFile, TestPiece, User } from '@/models';
import { getSequelize } from '@/lib/db';
import { conflict, HttpError, notFound, unprocessable } from '@/lib/errors';
import { parseInput } from '@/lib/http';
import { receiveUpload, type UploadResult } from '@/lib/uploads';
import { audit } from '@/lib/audit';
import { appUrl, linkMail, sendMail } from '@/lib/mail';
import type { EntryState } from '@/lib/domain';
import { entryWindowProblem } from '@/lib/seasons/window';
import { MATERIALS, type MaterialFamily } from '@/lib/inspection/materials';
import { EntryDetailsSchema, parseClaimedTime, type EntryDetails } from './schema';
import { classEligibility } from './eligibility';
import { checkGcode, checkPhotos, ENTRY_UPLOAD_SPEC, FileWriter, type CheckedGcode, type CheckedPhoto } from './files';
import { checkReinspectRate, currentGcode, currentGcodeOf, inspectionJson, latestInspection, queueInspection, queueInspectionRow, reinspect } from './inspection';
import { EVIDENCE_LINK_REQUIRED } from './messages';

export { ENTRY_UPLOAD_SPEC } from './files';

/** States an entry counts against the season's entry limit in. */
const COUNTED_STATES: EntryState[] = ['draft', 'submitted', 'verified', 'returned', 'rejected'];
/** States in which the entrant may change files and details. */
const EDITABLE_STATES: EntryState[] = ['draft', 'returned'];
const WITHDRAWABLE_STATES: EntryState[] = ['draft', 'submitted', 'returned', 'verified'];
/** Seasons whose standings are frozen: a verified entry stays in them. */
const FROZEN_SEASON_STATES = ['final', 'archived'];

/** The caller's entry or a 404 (others' entries, drafts included, are private). */
export async function ownEntry(userId: number, id: number): Promise<Entry> {
  const e = Number.isInteger(id) ? await Entry.findOne({ where: { id, entrantId: userId } }) : null;
  if (!e) throw notFound('No such entry.');
  return e;
}

/** The season takes entries now (open, and inside its published dates), or a 409 saying when it does. */
function requireOpen(season: Season) {
  const problem = entryWindowProblem(season);
  if (problem) throw conflict(problem);
}

/**
 * Claims the entry for a change inside `transaction`: a conditional update that only matches while
 * the entry is still the caller's and in one of `states`. Under the write lock nothing else changes
 * the entry until commit, so the check holds for everything the transaction writes afterwards.
 */
async function claimEntry(id: number, entrantId: number, states: EntryState[], transaction: Transaction, refuse: (state: string) => string) {
  const fresh = await Entry.findOne({ where: { id, entrantId }, attributes: ['state'], transaction });
  const state = fresh?.state;
  // (Sequelize drops an update of updatedAt alone, so the claim writes the state it read.)
  const [n] = state && states.includes(state) ? await Entry.update({ state }, { where: { id, entrantId, state }, transaction }) : [0];
  if (n !== 1) throw new HttpError(409, refuse(state ?? 'gone'), undefined, 'state_changed');
}

const notEditable = (what: string) => (state: string) =>
  `${what} can be changed while the entry is a draft or returned; it is ${state} now, so nothing was changed.`;

/** Season, class and machine for new details, with every check a person can fail. */
async function checkContext(userId: number, d: EntryDetails, excludeEntryId?: number, transaction?: Transaction) {
  const season = await Season.findByPk(d.seasonId, { transaction });
  if (!season || season.state === 'draft') throw notFound('No such season.');
  requireOpen(season);
  if (season.videoRequired && !d.evidenceUrl)
    throw unprocessable(`${season.name} asks for an evidence video: add its link.`, { evidenceUrl: EVIDENCE_LINK_REQUIRED });
  const cls = await ContestClass.findOne({ where: { id: d.classId, seasonId: season.id }, transaction });
  if (!cls) throw new HttpError(400, 'Choose a class of this season.', { classId: 'Choose a class of this season.' });
  const machine = await Machine.findOne({ where: { id: d.machineId, ownerId: userId }, transaction });
  if (!machine) throw notFound('No such machine.');
  if (machine.retiredAt) throw unprocessable(`${machine.name} is retired; choose another machine or un-retire it.`, { machineId: 'This machine is retired.' });
  const why = classEligibility(cls, machine, d.nozzleMm, d.materialFamily);
  if (why.length) throw unprocessable(`${machine.name} cannot enter ${cls.name}: ${why[0]}`, { classId: why.join(' ') });
  const counted = await Entry.count({
    where: { entrantId: userId, seasonId: season.id, classId: cls.id, state: COUNTED_STATES, ...(excludeEntryId ? { id: { [Op.ne]: excludeEntryId } } : {}) },
    transaction,
  });
  if (counted >= season.entryLimit) {
    throw conflict(`You already have ${counted} entries in ${cls.name}; the season allows ${season.entryLimit} per entrant and class. Withdraw a draft to make room.`, {
      classId: `Entry limit of ${season.entryLimit} reached in this class.`,
    });
  }
  return { season, cls, machine };
}

/** The parsed details are the columns (zod strips unknown keys), but for the claimed time, stored in ms. */
function detailColumns({ claimedTime, ...columns }: EntryDetails) {
  return { ...columns, claimedTimeMs: parseClaimedTime(claimedTime)! };
}

interface CheckedFiles {
  gcode: CheckedGcode | null;
  photos: CheckedPhoto[];
  project: UploadResult['files'][string][number] | null;
}

async function checkFiles(up: UploadResult): Promise<CheckedFiles> {
  const gcode = up.files.gcode?.[0] ? await checkGcode(up.files.gcode[0]) : null;
  const photos = await checkPhotos(up.files.photos ?? []);
  return { gcode, photos, project: up.files.project?.[0] ?? null };
}

const cleanupPhotos = (c: CheckedFiles | null) => Promise.all((c?.photos ?? []).map((p) => p.processed.cleanup()));

/** Marks the current files of a kind as replaced (kept for the judges' history, hidden elsewhere). */
async function markReplaced(entryId: number, kinds: string[], transaction: import('sequelize').Transaction) {
  const now = new Date().toISOString();
  const rows = await StoredFile.findAll({ where: { entryId, kind: kinds }, transaction });
  for (const f of rows) if (!f.meta?.replacedAt) await f.update({ meta: { ...f.meta, replacedAt: now } }, { transaction });
}

async function writeFiles(entry: Entry, userId: number, files: CheckedFiles, transaction: import('sequelize').Transaction, writer: FileWriter) {
  let inspectionId: number | null = null;
  if (files.gcode) {
    await markReplaced(entry.id, ['gcode'], transaction);
    const g = await writer.gcode(files.gcode);
    await entry.update({ gcodeSha256: g.sha256 }, { transaction });
    const { row } = await queueInspectionRow(entry.id, g.id, transaction);
    inspectionId = row.id;
  }
  if (files.photos.length) {
    await markReplaced(entry.id, ['photo', 'thumbnail'], transaction);
    for (const [i, p] of files.photos.entries()) await writer.photo(p, i);
  }
  if (files.project) {
    await markReplaced(entry.id, ['project'], transaction);
    await writer.project(files.project);
  }
  return inspectionId;
}

/**
 * Runs `fn` in a transaction with a FileWriter; removes moved files if it rolls back, queues the
 * inspection once it commits, and always deletes the temporary upload and photo files.
 */
async function withUpload<T extends { entryId: number; inspectionId: number | null }>(
  up: UploadResult,
  ownerId: number,
  check: () => Promise<CheckedFiles>,
  fn: (files: CheckedFiles, transaction: import('sequelize').Transaction, writerFor: (entryId: number) => FileWriter) => Promise<T>,
): Promise<{ id: number; inspectionId: number | null }> {
  let writer: FileWriter | null = null;
  let files: CheckedFiles | null = null;
  try {
    files = await check();
    const checked = files;
    let result: T;
    try {
      result = await getSequelize().transaction((transaction) => fn(checked, transaction, (entryId) => (writer = new FileWriter(entryId, ownerId, transaction))));
    } catch (err) {
      await (writer as FileWriter | null)?.undo();
      throw err;
    }
    if (result.inspectionId) queueInspection();
    return { id: result.entryId, inspectionId: result.inspectionId };
  } finally {
    await cleanupPhotos(files);
    await up.cleanup();
  }
}

/** One multipart request: details + G-code (+ photos, project file) → a draft entry being inspected. */
export async function createEntryFromUpload(user: User, req: Request) {
  const up = await receiveUpload(req, ENTRY_UPLOAD_SPEC);
  let details: EntryDetails;
  const check = async () => {
    details = parseInput(EntryDetailsSchema, up.fields);
    await checkContext(user.id, details);
    if (!up.files.gcode?.length) throw new HttpError(400, 'Add the G-code of your print (.gcode or .gcode.gz).', { gcode: 'Add the G-code (.gcode or .gcode.gz).' });
    return checkFiles(up);
  };
  return withUpload(up, user.id, check, async (files, transaction, writerFor) => {
    // Again under the write lock: two uploads at once cannot both take the last place in a class.
    await checkContext(user.id, details, undefined, transaction);
    const entry = await Entry.create({ ...detailColumns(details), entrantId: user.id, state: 'draft', gcodeSha256: null, submittedAt: null, decidedAt: null }, { transaction });
    const inspectionId = await writeFiles(entry, user.id, files, transaction, writerFor(entry.id));
    await audit('entry.created', { type: 'entry', id: entry.id }, { actorId: user.id, transaction });
    return { entryId: entry.id, inspectionId };
  });
}

/** New files for a draft or returned entry; a new G-code re-runs the inspection. */
export async function replaceEntryFiles(user: User, id: number, req: Request) {
  const entry = await ownEntry(user.id, id);
  if (!EDITABLE_STATES.includes(entry.state)) throw conflict(notEditable('Files')(entry.state));
  const season = await Season.findByPk(entry.seasonId);
  requireOpen(season!);
  const up = await receiveUpload(req, { ...ENTRY_UPLOAD_SPEC, fields: [] });
  const check = async () => {
    const files = await checkFiles(up);
    if (!files.gcode && !files.photos.length && !files.project) throw new HttpError(400, 'Choose at least one file to upload.');
    return files;
  };
  return withUpload(up, user.id, check, async (files, transaction, writerFor) => {
    // The upload may have streamed for minutes: the entry may have been submitted and verified
    // meanwhile. Checked where the files are written; the streamed files are removed on refusal.
    await claimEntry(entry.id, user.id, EDITABLE_STATES, transaction, notEditable('Files'));
    requireOpen((await Season.findByPk(entry.seasonId, { transaction }))!);
    const inspectionId = await writeFiles(entry, user.id, files, transaction, writerFor(entry.id));
    await audit('entry.files_replaced', { type: 'entry', id: entry.id }, { actorId: user.id, transaction, details: { gcode: !!files.gcode, photos: files.photos.length, project: !!files.project } });
    return { entryId: entry.id, inspectionId };
  });
}

/** Changes the details of a draft or returned entry and re-inspects (the claims changed). */
export async function updateEntryDetails(user: User, id: number, raw: unknown) {
  const entry = await ownEntry(user.id, id);
  if (!EDITABLE_STATES.includes(entry.state)) throw conflict(notEditable('Details')(entry.state));
  const details = parseInput(EntryDetailsSchema, raw);
  if (details.seasonId !== entry.seasonId) throw new HttpError(400, 'An entry cannot move to another season.', { seasonId: 'An entry stays in its season.' });
  const inspectionId = await getSequelize().transaction(async (transaction) => {
    await checkContext(user.id, details, entry.id, transaction);
    const [n] = await Entry.update(detailColumns(details), { where: { id: entry.id, entrantId: user.id, state: EDITABLE_STATES }, transaction });
    if (n !== 1) await claimEntry(entry.id, user.id, EDITABLE_STATES, transaction, notEditable('Details'));
    // The claims changed (time, sizes, material): the current G-code is inspected again against them.
    const row = await reinspect(entry, transaction);
    return row?.id ?? null;
  });
  return { id: entry.id, inspectionId };
}

/** `intro` gets "Season (Class)" to name where the entry competes. */
async function mailEntrant(entry: Entry, subject: string, intro: (where: string) => string, outro: string, transaction: Transaction) {
  const [user, season, cls] = await Promise.all([User.findByPk(entry.entrantId, { transaction }), Season.findByPk(entry.seasonId, { transaction }), ContestClass.findByPk(entry.classId, { transaction })]);
  if (!user || !season || !cls) return;
  // Queued in the same transaction, delivered after commit: a mail failure cannot change the answer.
  await sendMail(linkMail(user.email, `${subject}: ${season.name} · ${cls.name} (entry #${entry.id})`, intro(`${season.name} (${cls.name})`), 'Open the entry', appUrl(`/me/entries/${entry.id}`), outro), { transaction });
}

/** What the caller has already read for an entry, so submitBlockers does not read it again. */
export interface SubmitContext {
  season?: Season;
  /** All the entry's files: every kind, replaced ones too. */
  files?: StoredFile[];
  /** The entry's latest inspection (null: it has none). */
  inspection?: Inspection | null;
}

/** What stands between this entry and submitting, as sentences (empty = may submit). */
export async function submitBlockers(entry: Entry, loaded: SubmitContext = {}): Promise<string[]> {
  const out: string[] = [];
  const [season, files, insp] = await Promise.all([
    loaded.season ?? Season.findByPk(entry.seasonId).then((s) => s!),
    loaded.files ?? StoredFile.findAll({ where: { entryId: entry.id }, attributes: ['id', 'kind', 'meta', 'createdAt'] }),
    loaded.inspection !== undefined ? loaded.inspection : latestInspection(entry.id),
  ]);
  const windowProblem = entryWindowProblem(season);
  if (windowProblem) out.push(windowProblem);
  if (!EDITABLE_STATES.includes(entry.state)) out.push(`The entry is ${entry.state}.`);
  const gcode = currentGcodeOf(files);
  if (!gcode) out.push('Upload the G-code of your print.');
  const photoCount = files.filter((f) => f.kind === 'photo' && !f.meta?.replacedAt).length;
  if (photoCount < season.photosRequired) out.push(`The season asks for ${season.photosRequired} photos; this entry has ${photoCount}.`);
  if (season.videoRequired && !entry.evidenceUrl) out.push('The season asks for an evidence video: add its link under “Edit details”.');
  if (gcode) {
    if (!insp || insp.storedFileId !== gcode.id || insp.status === 'queued' || insp.status === 'running') out.push('The inspection is still running.');
    else if (insp.status === 'failed') out.push(`The inspection failed: ${insp.error ?? 'unknown reason'}. Upload the file again or inspect again.`);
    else if (insp.blockingFailures > 0) out.push(`The inspection found ${insp.blockingFailures} blocking problem${insp.blockingFailures > 1 ? 's' : ''}; fix ${insp.blockingFailures > 1 ? 'them' : 'it'} (see the report) and upload the corrected G-code.`);
  }
  if (entry.state === 'returned' && entry.decidedAt) {
    const decidedAt = entry.decidedAt;
    if (!files.some((f) => f.createdAt > decidedAt)) out.push('The entry was returned: upload the corrected files before submitting it again.');
  }
  return out;
}

export async function submitEntry(user: User, id: number) {
  await ownEntry(user.id, id);
  return getSequelize().transaction(async (transaction) => {
    // Everything is read under the write lock: no upload, edit or decision commits in between.
    const entry = (await Entry.findOne({ where: { id, entrantId: user.id }, transaction }))!;
    const season = (await Season.findByPk(entry.seasonId, { transaction }))!;
    requireOpen(season);
    if (!EDITABLE_STATES.includes(entry.state)) throw conflict(`Only a draft or a returned entry can be submitted; this one is ${entry.state}.`);
    const [files, inspection] = await Promise.all([
      StoredFile.findAll({ where: { entryId: entry.id }, attributes: ['id', 'kind', 'meta', 'createdAt'], transaction }),
      latestInspection(entry.id, transaction),
    ]);
    const blockers = await submitBlockers(entry, { season, files, inspection });
    if (blockers.length) throw unprocessable(blockers[0], { submit: blockers.join(' ') });
    const resubmitted = entry.state === 'returned';
    // The judges verify what was inspected here: the inspection current at submission is recorded,
    // and the update only applies while it is still the entry's newest one.
    const [n] = await Entry.update(
      { state: 'submitted', submittedAt: new Date(), decidedAt: null, submittedInspectionId: inspection!.id },
      { where: { id: entry.id, entrantId: user.id, state: entry.state, [Op.and]: literal(`(SELECT MAX(i.id) FROM inspections i WHERE i.entry_id = ${entry.id}) = ${inspection!.id}`) }, transaction },
    );
    if (n !== 1) throw new HttpError(409, 'The entry changed while it was being submitted (new files or a new inspection); reload it and submit again.', undefined, 'state_changed');
    await audit('entry.submitted', { type: 'entry', id: entry.id }, { actorId: user.id, details: { resubmitted, inspectionId: inspection!.id }, transaction });
    await mailEntrant(
      entry,
      resubmitted ? 'Entry resubmitted' : 'Entry received',
      (where) =>
        resubmitted
          ? `Your corrected entry #${entry.id} in ${where} is back in the judges' queue.`
          : `We received your entry #${entry.id} in ${where}. The inspection passed the blocking rules; a judge will now review your evidence.`,
      'You will get an e-mail when a judge decides. You can withdraw the entry from its page until then.',
      transaction,
    );
    return { id: entry.id, state: 'submitted' as EntryState };
  });
}

export async function withdrawEntry(user: User, id: number) {
  await ownEntry(user.id, id);
  return getSequelize().transaction(async (transaction) => {
    const entry = (await Entry.findOne({ where: { id, entrantId: user.id }, transaction }))!;
    const season = (await Season.findByPk(entry.seasonId, { transaction }))!;
    if (entry.state === 'verified' && FROZEN_SEASON_STATES.includes(season.state))
      throw conflict(`The standings of ${season.name} are ${season.state}: a verified entry stays in them and cannot be withdrawn. Nothing was changed; write to the organizers if something is wrong with it.`);
    if (!WITHDRAWABLE_STATES.includes(entry.state)) throw conflict(`A ${entry.state} entry cannot be withdrawn.`);
    const from = entry.state;
    // Conditional: still in the state read above, and a verified entry only while its season's standings are not frozen.
    const [n] = await Entry.update(
      { state: 'withdrawn' },
      {
        where: {
          id: entry.id,
          entrantId: user.id,
          state: from,
          [Op.and]: literal(`(entries.state <> 'verified' OR (SELECT s.state FROM seasons s WHERE s.id = entries.season_id) NOT IN (${FROZEN_SEASON_STATES.map((s) => `'${s}'`).join(', ')}))`),
        },
        transaction,
      },
    );
    if (n !== 1) throw new HttpError(409, 'The entry changed a moment ago (a judge decided, or the season moved on); reload it to see where it stands. Nothing was changed.', undefined, 'state_changed');
    await audit('entry.withdrawn', { type: 'entry', id: entry.id }, { actorId: user.id, details: { from }, transaction });
    await mailEntrant(entry, 'Entry withdrawn', (where) => `You withdrew entry #${entry.id} in ${where}. It no longer counts in the standings and judges will not review it.`, 'Its files and inspection stay on its page.', transaction);
    return { id: entry.id, state: 'withdrawn' as EntryState };
  });
}

export async function reinspectEntry(user: User, id: number) {
  const entry = await ownEntry(user.id, id);
  if (!EDITABLE_STATES.includes(entry.state)) throw conflict(`Only a draft or a returned entry can be inspected again; this one is ${entry.state}.`);
  const gcode = await currentGcode(entry.id);
  if (!gcode) throw new HttpError(400, 'Upload the G-code first.');
  // The rate check, the queued row and the audit event that the next check counts: one transaction.
  const row = await getSequelize().transaction(async (transaction) => {
    // A submit at the same moment must not get a new inspection under the judges: checked where written.
    await claimEntry(entry.id, user.id, EDITABLE_STATES, transaction, (state) => `Only a draft or a returned entry can be inspected again; this one is ${state} now.`);
    await checkReinspectRate(user.id, transaction);
    const { row } = await queueInspectionRow(entry.id, gcode.id, transaction);
    await audit('entry.reinspected', { type: 'entry', id: entry.id }, { actorId: user.id, transaction });
    return row;
  });
  queueInspection();
  return { id: entry.id, inspectionId: row.id };
}

function fileJson(f: StoredFile) {
  const m = f.meta ?? {};
  return {
    id: f.id,
    kind: f.kind,
    name: f.originalName,
    sizeBytes: f.sizeBytes,
    sha256: f.sha256,
    url: `/api/files/${f.id}`,
    thumbnailUrl: typeof m.thumbnailId === 'number' ? `/api/files/${m.thumbnailId}` : null,
    capturedAt: (m.capturedAt as string | null | undefined) ?? null,
    locationRemoved: !!m.locationRemoved,
    noThumbnailReason: (m.noThumbnailReason as string | undefined) ?? null,
    uploadedAt: f.createdAt.toISOString(),
  };
}

/** The entrant's view of one entry: details, files, the current inspection and the histories. */
export async function entryView(user: User, id: number) {
  const entry = await ownEntry(user.id, id);
  const [season, cls, machine, files, inspections, reviews, piece] = await Promise.all([
    Season.findByPk(entry.seasonId),
    ContestClass.findByPk(entry.classId),
    Machine.findByPk(entry.machineId),
    StoredFile.findAll({ where: { entryId: entry.id }, order: [['id', 'ASC']] }),
    Inspection.findAll({ where: { entryId: entry.id }, order: [['id', 'DESC']], attributes: ['id', 'status', 'blockingFailures', 'advisoryFlags', 'createdAt', 'finishedAt', 'storedFileId', 'error'] }),
    Review.findAll({ where: { entryId: entry.id }, order: [['createdAt', 'ASC']] }),
    TestPiece.findOne({ where: { seasonId: entry.seasonId } }),
  ]);
  const current = await latestInspection(entry.id);
  const live = files.filter((f) => !f.meta?.replacedAt);
  const byId = new Map(files.map((f) => [f.id, f]));
  const windowProblem = entryWindowProblem(season!);
  const editable = EDITABLE_STATES.includes(entry.state) && !windowProblem;
  return {
    id: entry.id,
    state: entry.state,
    season: { id: season!.id, slug: season!.slug, name: season!.name, state: season!.state, photosRequired: season!.photosRequired, videoRequired: season!.videoRequired, photoKinds: season!.photoKinds ?? [] },
    class: { id: cls!.id, name: cls!.name },
    machine: { id: machine!.id, name: machine!.name },
    materialFamily: entry.materialFamily,
    materialLabel: MATERIALS[entry.materialFamily as MaterialFamily]?.label ?? entry.materialFamily,
    materialName: entry.materialName,
    nozzleMm: entry.nozzleMm,
    claimedTimeMs: entry.claimedTimeMs,
    evidenceUrl: entry.evidenceUrl,
    measuredMm: { x: entry.measuredXMm, y: entry.measuredYMm, z: entry.measuredZMm },
    testPieceSizeMm: piece ? { x: piece.sizeXMm, y: piece.sizeYMm, z: piece.sizeZMm } : null,
    notes: entry.notes,
    submittedAt: entry.submittedAt?.toISOString() ?? null,
    decidedAt: entry.decidedAt?.toISOString() ?? null,
    files: {
      gcode: live.filter((f) => f.kind === 'gcode').map(fileJson)[0] ?? null,
      photos: live.filter((f) => f.kind === 'photo').map(fileJson),
      project: live.filter((f) => f.kind === 'project').map(fileJson)[0] ?? null,
    },
    inspection: current ? inspectionJson(current) : null,
    inspections: inspections.map((i) => ({
      id: i.id, status: i.status, blockingFailures: i.blockingFailures, advisoryFlags: i.advisoryFlags, error: i.error,
      createdAt: i.createdAt.toISOString(), finishedAt: i.finishedAt?.toISOString() ?? null,
      fileName: i.storedFileId ? (byId.get(i.storedFileId)?.originalName ?? null) : null,
    })),
    // Judges stay anonymous to entrants; the decision, reasons and note are theirs to read.
    reviews: reviews.map((r) => ({ id: r.id, decision: r.decision, reasonCodes: r.reasonCodes, note: r.note, createdAt: r.createdAt.toISOString() })),
    canEdit: editable,
    canSubmit: editable,
    blockers: editable ? await submitBlockers(entry, { season: season!, files, inspection: current }) : [],
    canWithdraw: WITHDRAWABLE_STATES.includes(entry.state) && !(entry.state === 'verified' && FROZEN_SEASON_STATES.includes(season!.state)),
    /** Why the entry cannot be changed now although its state would allow it (the season's window). */
    windowProblem: EDITABLE_STATES.includes(entry.state) ? windowProblem : null,
  };
}
export type EntryView = Awaited<ReturnType<typeof entryView>>;

/** Just the inspection (for polling). */
export async function entryInspection(user: User, id: number) {
  const entry = await ownEntry(user.id, id);
  const row = await latestInspection(entry.id);
  return { inspection: row ? inspectionJson(row) : null, blockers: EDITABLE_STATES.includes(entry.state) ? await submitBlockers(entry) : [] };
}

/** What the new-entry form offers: open seasons, their classes, the entrant's machines and which class each may enter. */
export async function entryFormOptions(userId: number) {
  const [seasons, machines, used] = await Promise.all([
    Season.findAll({ where: { state: 'open' }, order: [['closesAt', 'ASC']], include: [{ model: ContestClass, as: 'classes' }, { model: TestPiece }] }),
    Machine.findAll({ where: { ownerId: userId, retiredAt: null }, order: [['name', 'ASC']] }),
    Entry.findAll({ where: { entrantId: userId, state: COUNTED_STATES }, attributes: ['classId'], raw: true }),
  ]);
  const usedByClass = new Map<number, number>();
  for (const u of used) usedByClass.set(u.classId, (usedByClass.get(u.classId) ?? 0) + 1);
  return {
    seasons: seasons.map((s) => {
      const classes = ((s as unknown as { classes: ContestClass[] }).classes ?? []).sort((a, b) => a.displayOrder - b.displayOrder);
      const piece = (s as unknown as { TestPiece: TestPiece | null }).TestPiece;
      return {
        id: s.id, slug: s.slug, name: s.name, photosRequired: s.photosRequired, videoRequired: s.videoRequired, photoKinds: s.photoKinds ?? [], entryLimit: s.entryLimit,
        /** Why the season takes no entries right now (before its opening date, after its closing date). */
        windowProblem: entryWindowProblem(s),
        timingConvention: s.timingConvention,
        testPieceSizeMm: piece ? { x: piece.sizeXMm, y: piece.sizeYMm, z: piece.sizeZMm } : null,
        classes: classes.map((c) => ({
          id: c.id, name: c.name, description: c.description, materialFamilies: c.materialFamilies,
          /** The entrant's entries counted against the season's limit in this class. */
          entriesUsed: usedByClass.get(c.id) ?? 0,
          // Reasons per machine at the machine's own nozzle; the server checks again with the entry's nozzle and material.
          ineligible: Object.fromEntries(machines.map((m) => [m.id, classEligibility(c, m, m.nozzleMm, null)])),
        })),
      };
    }),
    machines: machines.map((m) => ({ id: m.id, name: m.name, nozzleMm: m.nozzleMm, motionSystem: m.motionSystem })),
  };
}
