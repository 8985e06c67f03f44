/**
 * Read models for the public standings pages and the v1 API: seasons, one class's standings, an
 * entrant's older prints, a verified entry, entrant and machine histories, and the season overview.
 * Only non-draft seasons and verified entries are ever shown.
 */
import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import { parseId as parsePlainId } from '@/lib/ids';
import { getSequelize } from '@/lib/db';
import { parseJsonColumn } from '@/lib/dbDialect';
import { badRequest, notFound } from '@/lib/errors';
import { ruleSentence, RuleSchema } from '@/lib/inspection/rules';
import { ensureFrozen, isFrozenState } from './freeze';
import { isoDate, ranksOf, runFields, standingsPage, type ClassRef, type StandingsPage, type StandingsRow } from './query';
import type { StandingsQuery } from './params';
import { inspectionSummary, flowSeriesPoints, type FlowSeries } from './summary';
import { latestReinspection } from '@/lib/reviews/reinspection';
import { readStoredReport } from '@/lib/inspection/contract';
import { overEstimatePercent, type PublicStandingsRow } from './estimate';
import { DEFAULT_QUERY } from './params';

const seq = () => getSequelize();
const select = <T extends object>(sql: string, replacements: unknown[] | Record<string, unknown>): Promise<T[]> =>
  seq().query<T>(sql, { replacements, type: QueryTypes.SELECT });

const SlugSchema = z.string().regex(/^[a-z0-9][a-z0-9-]{0,63}$/);

export function parseSlug(value: string, what: 'season' | 'class'): string {
  if (!SlugSchema.safeParse(value).success) throw badRequest(`The ${what} must be given by its slug: lowercase letters, digits and hyphens (e.g. "open-04").`, { [what]: 'Not a valid slug.' });
  return value;
}

export function parseId(value: string, what: string): number {
  const id = parsePlainId(value);
  if (id === null) throw badRequest(`The ${what} id must be a positive whole number.`, { [what]: 'Not a valid id.' });
  return id;
}

interface SeasonRow {
  id: number;
  slug: string;
  name: string;
  host_name: string;
  description: string;
  state: string;
  opens_at: string;
  closes_at: string;
  time_zone: string;
  timing_convention: string;
}
interface ClassRow {
  id: number;
  season_id: number;
  slug: string;
  name: string;
  description: string;
  nozzle_diameters_mm: string;
  nozzle_min_mm: number | null;
  material_families: string;
  motion_systems: string;
  build_volume_min_mm: number | null;
  build_volume_max_mm: number | null;
  modification: string;
}

/** A JSON column of a raw row (text on SQLite, already parsed on PostgreSQL). */
const json = <T>(s: unknown, fallback: T): T => {
  try {
    return s ? (parseJsonColumn<T>(s) ?? fallback) : fallback;
  } catch {
    return fallback;
  }
};

function seasonJson(s: SeasonRow) {
  return {
    slug: s.slug,
    name: s.name,
    host: s.host_name,
    state: s.state,
    opens_at: isoDate(s.opens_at),
    closes_at: isoDate(s.closes_at),
    frozen: isFrozenState(s.state),
  };
}

function classJson(c: ClassRow) {
  return {
    slug: c.slug,
    name: c.name,
    description: c.description,
    eligibility: {
      nozzle_diameters_mm: json<number[]>(c.nozzle_diameters_mm, []),
      nozzle_min_mm: c.nozzle_min_mm,
      material_families: json<string[]>(c.material_families, []),
      motion_systems: json<string[]>(c.motion_systems, []),
      build_volume_min_mm: c.build_volume_min_mm,
      build_volume_max_mm: c.build_volume_max_mm,
      modification: c.modification,
    },
  };
}

export async function findSeason(slug: string): Promise<SeasonRow> {
  const [s] = await select<SeasonRow>("SELECT * FROM seasons WHERE slug = ? AND state <> 'draft'", [slug]);
  if (!s) throw notFound(`No published season "${slug}".`);
  return s;
}

export async function seasonClasses(seasonId: number): Promise<ClassRow[]> {
  return select<ClassRow>('SELECT * FROM classes WHERE season_id = ? ORDER BY display_order, id', [seasonId]);
}

export async function findClass(season: SeasonRow, classSlug: string): Promise<ClassRow> {
  const [c] = await select<ClassRow>('SELECT * FROM classes WHERE season_id = ? AND slug = ?', [season.id, classSlug]);
  if (!c) throw notFound(`Season "${season.slug}" has no class "${classSlug}".`);
  return c;
}

export async function classRef(season: Pick<SeasonRow, 'id' | 'state'>, cls: Pick<ClassRow, 'id'>): Promise<ClassRef> {
  const frozen = isFrozenState(season.state);
  if (frozen) await ensureFrozen(season.id);
  return { seasonId: season.id, classId: cls.id, frozen };
}

export async function seasonsList() {
  const seasons = await select<SeasonRow>("SELECT * FROM seasons WHERE state <> 'draft' ORDER BY opens_at DESC, id DESC", []);
  const classes = seasons.length ? await select<ClassRow>(`SELECT * FROM classes WHERE season_id IN (:ids) ORDER BY display_order, id`, { ids: seasons.map((s) => s.id) }) : [];
  return {
    seasons: seasons.map((s) => ({
      ...seasonJson(s),
      classes: classes.filter((c) => c.season_id === s.id).map((c) => ({ slug: c.slug, name: c.name })),
      links: { self: `/api/v1/seasons/${s.slug}` },
    })),
  };
}

interface RuleRow {
  id: number;
  class_id: number | null;
  metric: string;
  comparator: string;
  value: number;
  value_max: number | null;
  tolerance: number;
  severity: string;
  sentence: string;
}

function ruleJson(r: RuleRow) {
  const parsed = RuleSchema.safeParse({ metric: r.metric, comparator: r.comparator, value: r.value, valueMax: r.value_max ?? undefined, tolerance: r.tolerance, severity: r.severity, sentence: r.sentence || undefined });
  return {
    metric: r.metric,
    comparator: r.comparator,
    value: r.value,
    value_max: r.value_max,
    tolerance: r.tolerance,
    severity: r.severity,
    sentence: parsed.success ? ruleSentence(parsed.data) : r.sentence || `${r.metric} ${r.comparator} ${r.value}`,
  };
}

export async function seasonDetail(slug: string) {
  const s = await findSeason(slug);
  const [classes, rules, [piece]] = await Promise.all([
    seasonClasses(s.id),
    select<RuleRow>('SELECT * FROM rules WHERE season_id = ? ORDER BY class_id, position, id', [s.id]),
    select<{ name: string; size_x_mm: number; size_y_mm: number; size_z_mm: number; volume_mm3: number }>('SELECT * FROM test_pieces WHERE season_id = ?', [s.id]),
  ]);
  return {
    season: {
      ...seasonJson(s),
      description: s.description,
      timing: s.timing_convention,
      test_piece: piece ? { name: piece.name, size_mm: { x: piece.size_x_mm, y: piece.size_y_mm, z: piece.size_z_mm }, volume_mm3: piece.volume_mm3 } : null,
      rulebook: rules.filter((r) => r.class_id == null).map(ruleJson),
      classes: classes.map((c) => ({
        ...classJson(c),
        rules: rules.filter((r) => r.class_id === c.id).map(ruleJson),
        links: { standings: `/api/v1/seasons/${s.slug}/classes/${c.slug}/standings`, page: `/seasons/${s.slug}/classes/${c.slug}` },
      })),
    },
  };
}

/** A standings page as published: rows carry the inspection's time estimate. */
export interface PublicStandingsPage extends Omit<StandingsPage, 'rows'> {
  rows: PublicStandingsRow[];
}

export interface ClassStandings {
  season: ReturnType<typeof seasonJson>;
  class: { slug: string; name: string; description: string };
  page: PublicStandingsPage;
}

/**
 * Adds each row's time estimate (the entry's newest finished inspection; the same inspection the
 * live ranking reads its flow figures from). Looked up for the rows of the page only, in chunks.
 */
export async function withEstimates(rows: StandingsRow[]): Promise<PublicStandingsRow[]> {
  const est = new Map<number, number | null>();
  const ids = rows.map((r) => r.entry_id);
  for (let i = 0; i < ids.length; i += 2000) {
    const found = await select<{ entry_id: number; estimated_time_s: number | null }>(
      `SELECT e.id AS entry_id, i.estimated_time_s FROM entries e ${LATEST_INSPECTION} WHERE e.id IN (:ids)`,
      { ids: ids.slice(i, i + 2000) },
    );
    for (const f of found) est.set(f.entry_id, f.estimated_time_s);
  }
  return rows.map((r) => {
    const e = est.get(r.entry_id) ?? null;
    return { ...r, estimated_time_s: e, over_estimate_percent: overEstimatePercent(r.time_ms, e) };
  });
}

export async function classStandings(seasonSlug: string, classSlug: string, q: StandingsQuery, opts: { all?: boolean } = {}): Promise<ClassStandings> {
  const season = await findSeason(seasonSlug);
  const cls = await findClass(season, classSlug);
  const ref = await classRef(season, cls);
  const page = await standingsPage(ref, q, opts);
  return { season: seasonJson(season), class: { slug: cls.slug, name: cls.name, description: cls.description }, page: { ...page, rows: await withEstimates(page.rows) } };
}

/** Every class's whole standings of one published season, in the classes' display order. */
export async function seasonResults(seasonSlug: string) {
  const season = await findSeason(seasonSlug);
  const classes = await seasonClasses(season.id);
  const out: { class: { slug: string; name: string }; rows: PublicStandingsRow[] }[] = [];
  for (const cls of classes) {
    const page = await standingsPage(await classRef(season, cls), DEFAULT_QUERY, { all: true });
    out.push({ class: { slug: cls.slug, name: cls.name }, rows: await withEstimates(page.rows) });
  }
  return { season: seasonJson(season), classes: out };
}

interface EntryFigures {
  id: number;
  claimed_time_ms: number;
  submitted_at: string | null;
  decided_at: string | null;
  material_family: string;
  nozzle_mm: number;
  machine_id: number;
  machine_name: string;
  motion_system: string;
  peak_flow_mm3s: number | null;
  p95_flow_mm3s: number | null;
  layer_height_mm: number | null;
}

const LATEST_INSPECTION = `LEFT JOIN inspections i ON i.id = (
  SELECT i2.id FROM inspections i2 WHERE i2.entry_id = e.id AND i2.status = 'done' ORDER BY i2.created_at DESC, i2.id DESC LIMIT 1)`;

/** Every verified entry of one entrant in one class, fastest first: the "older prints" under a standings row. */
export async function entrantRunsInClass(seasonSlug: string, classSlug: string, entrantId: number) {
  const season = await findSeason(seasonSlug);
  const cls = await findClass(season, classSlug);
  const ref = await classRef(season, cls);
  const rows = await select<EntryFigures>(
    `SELECT e.id, e.claimed_time_ms, e.submitted_at, e.decided_at, e.material_family, e.nozzle_mm, e.machine_id, m.name AS machine_name, m.motion_system,
            i.peak_flow_mm3s, i.p95_flow_mm3s, i.layer_height_mm
     FROM entries e JOIN machines m ON m.id = e.machine_id ${LATEST_INSPECTION}
     WHERE e.season_id = ? AND e.class_id = ? AND e.entrant_id = ? AND e.state = 'verified'
     ORDER BY e.claimed_time_ms, e.submitted_at, e.id`,
    [season.id, cls.id, entrantId],
  );
  if (!rows.length) throw notFound('This entrant has no verified entry in this class.');
  const ranks = await ranksOf(ref, rows.map((r) => r.id));
  return {
    entries: rows.map((r) => ({
      entry_id: r.id,
      rank: ranks.get(r.id) ?? null,
      ...runFields(r),
    })),
  };
}

interface EntryDetailRow extends EntryFigures {
  season_id: number;
  class_id: number;
  entrant_id: number;
  entrant_name: string;
  material_name: string;
  evidence_url: string;
  measured_x_mm: number | null;
  measured_y_mm: number | null;
  measured_z_mm: number | null;
  season_slug: string;
  season_name: string;
  season_state: string;
  class_slug: string;
  class_name: string;
  build_x_mm: number;
  build_y_mm: number;
  build_z_mm: number;
  hotend: string;
  extruder: string;
  firmware: string;
  modifications: string;
  inspection_id: number | null;
  report: string | null;
  rule_results: string | null;
  flags: string | null;
  estimated_time_s: number | null;
  engine_version: string | null;
  finished_at: string | null;
  state: string;
  reopened_at: string | null;
}

export interface PublicEntry {
  id: number;
  /** `back_with_judges`: was verified, then a re-inspection failed a blocking rule; not ranked until the judges decide again. */
  status: 'verified' | 'back_with_judges';
  /** The latest re-inspection, stated as what happened (no claim about what the judges saw). */
  reinspection: { at: string; /** it sent the entry back to the judges */ reopened: boolean; rulebook_changed: boolean } | null;
  season: { slug: string; name: string; state: string };
  class: { slug: string; name: string };
  entrant: { id: number; name: string };
  machine: { id: number; name: string; motion: string; build_volume_mm: { x: number; y: number; z: number }; hotend: string; extruder: string; firmware: string; modifications: string };
  material: string;
  material_name: string;
  nozzle_mm: number;
  time_ms: number;
  rank: number | null;
  submitted_at: string | null;
  decided_at: string | null;
  evidence_url: string;
  measured_size_mm: { x: number | null; y: number | null; z: number | null };
  photos: { id: number; name: string; url: string }[];
  inspection: {
    engine_version: string | null;
    finished_at: string | null;
    peak_flow_mm3s: number | null;
    p95_flow_mm3s: number | null;
    layer_height_mm: number | null;
    estimated_time_s: number | null;
    rules: { pass: number; fail: number; unknown: number };
    flags: { code: string; severity: string; message: string }[];
    summary: string[];
    flow_series: FlowSeries | null;
  } | null;
}

/** A verified entry of a published season, or 404 (unverified entries are not public). */
export async function publicEntry(id: number): Promise<PublicEntry> {
  const [r] = await select<EntryDetailRow>(
    `SELECT e.*, e.id AS id, u.name AS entrant_name, m.name AS machine_name, m.motion_system, m.build_x_mm, m.build_y_mm, m.build_z_mm,
            m.hotend, m.extruder, m.firmware, m.modifications,
            s.slug AS season_slug, s.name AS season_name, s.state AS season_state, c.slug AS class_slug, c.name AS class_name,
            i.id AS inspection_id, i.report, i.rule_results, i.flags, i.peak_flow_mm3s, i.p95_flow_mm3s, i.layer_height_mm, i.estimated_time_s,
            i.engine_version, i.finished_at
     FROM entries e JOIN users u ON u.id = e.entrant_id JOIN machines m ON m.id = e.machine_id
     JOIN seasons s ON s.id = e.season_id JOIN classes c ON c.id = e.class_id ${LATEST_INSPECTION}
     WHERE e.id = ? AND (e.state = 'verified' OR (e.state = 'submitted' AND e.reopened_at IS NOT NULL)) AND s.state <> 'draft'`,
    [id],
  );
  if (!r) throw notFound(`No verified entry ${id}.`);
  const verified = r.state === 'verified';
  const re = await latestReinspection(r.id);
  const frozen = isFrozenState(r.season_state);
  if (frozen) await ensureFrozen(r.season_id);
  const [ranks, photos] = await Promise.all([
    ranksOf({ seasonId: r.season_id, classId: r.class_id, frozen }, [r.id]),
    verified ? select<{ id: number; original_name: string }>("SELECT id, original_name FROM stored_files WHERE entry_id = ? AND kind = 'photo' ORDER BY id", [r.id]) : Promise.resolve([]),
  ]);
  const report = readStoredReport(r.report);
  const ruleResults = json<{ status?: string }[]>(r.rule_results, []);
  const flags = json<{ code?: string; severity?: string; message?: string }[]>(r.flags, []);
  const count = (st: string) => ruleResults.filter((x) => x?.status === st).length;
  // The judges weighed this inspection only if it was finished when they decided.
  const finishedMs = r.finished_at ? Date.parse(isoDate(r.finished_at) ?? '') : NaN;
  const decidedMs = r.decided_at ? Date.parse(isoDate(r.decided_at) ?? '') : NaN;
  const judgedThisInspection = verified && finishedMs <= decidedMs;
  return {
    id: r.id,
    status: verified ? 'verified' : 'back_with_judges',
    reinspection: re && { at: re.at, reopened: re.reopened, rulebook_changed: re.rulebookChanged },
    season: { slug: r.season_slug, name: r.season_name, state: r.season_state },
    class: { slug: r.class_slug, name: r.class_name },
    entrant: { id: r.entrant_id, name: r.entrant_name },
    machine: { id: r.machine_id, name: r.machine_name, motion: r.motion_system, build_volume_mm: { x: r.build_x_mm, y: r.build_y_mm, z: r.build_z_mm }, hotend: r.hotend, extruder: r.extruder, firmware: r.firmware, modifications: r.modifications },
    material: r.material_family,
    material_name: r.material_name,
    nozzle_mm: r.nozzle_mm,
    time_ms: r.claimed_time_ms,
    rank: ranks.get(r.id) ?? null,
    submitted_at: isoDate(r.submitted_at),
    decided_at: isoDate(r.decided_at),
    evidence_url: r.evidence_url,
    measured_size_mm: { x: r.measured_x_mm, y: r.measured_y_mm, z: r.measured_z_mm },
    photos: photos.map((p) => ({ id: p.id, name: p.original_name, url: `/api/v1/entries/${r.id}/photos/${p.id}` })),
    inspection:
      r.inspection_id == null
        ? null
        : {
            engine_version: r.engine_version,
            finished_at: isoDate(r.finished_at),
            peak_flow_mm3s: r.peak_flow_mm3s,
            p95_flow_mm3s: r.p95_flow_mm3s,
            layer_height_mm: r.layer_height_mm,
            estimated_time_s: r.estimated_time_s,
            rules: { pass: count('pass'), fail: count('fail'), unknown: count('unknown') },
            flags: flags.map((f) => ({ code: String(f.code ?? ''), severity: String(f.severity ?? 'info'), message: String(f.message ?? '') })),
            summary: inspectionSummary({ report, claimedTimeMs: r.claimed_time_ms, rules: { pass: count('pass'), fail: count('fail'), unknown: count('unknown') }, flags: flags.length, judgedThisInspection }),
            flow_series: flowSeriesPoints(report),
          },
  };
}

interface HistoryRow extends EntryFigures {
  season_id: number;
  class_id: number;
  season_slug: string;
  season_name: string;
  season_state: string;
  opens_at: string;
  class_slug: string;
  class_name: string;
  entrant_id: number;
  entrant_name: string;
  piece_name: string | null;
  piece_sha256: string | null;
  piece_x_mm: number | null;
  piece_y_mm: number | null;
  piece_z_mm: number | null;
}

/** Which test piece a season used: the same STL (by content) in several seasons is one piece. */
function pieceOf(r: HistoryRow): { key: string; name: string } | null {
  if (r.piece_name == null) return null;
  const size = [r.piece_x_mm, r.piece_y_mm, r.piece_z_mm].map((v) => (v == null ? '?' : Number(v).toFixed(2))).join('×');
  return { key: r.piece_sha256 ? r.piece_sha256.slice(0, 16) : `${r.piece_name}|${size}`, name: r.piece_name };
}

export interface HistoryEntry {
  entry_id: number;
  season: { slug: string; name: string; opens_at: string | null };
  class: { slug: string; name: string };
  entrant: { id: number; name: string };
  machine: { id: number; name: string };
  /** The season's test piece; times are comparable only within one piece. */
  test_piece: { key: string; name: string } | null;
  time_ms: number;
  rank: number | null;
  material: string;
  peak_flow_mm3s: number | null;
  date: string | null;
}

async function history(where: string, id: number): Promise<HistoryEntry[]> {
  const rows = await select<HistoryRow>(
    `SELECT e.id, e.season_id, e.class_id, e.entrant_id, u.name AS entrant_name, e.claimed_time_ms, e.submitted_at, e.decided_at, e.material_family, e.nozzle_mm,
            e.machine_id, m.name AS machine_name, m.motion_system, i.peak_flow_mm3s, i.p95_flow_mm3s, i.layer_height_mm,
            s.slug AS season_slug, s.name AS season_name, s.state AS season_state, s.opens_at, c.slug AS class_slug, c.name AS class_name,
            tp.name AS piece_name, tp.size_x_mm AS piece_x_mm, tp.size_y_mm AS piece_y_mm, tp.size_z_mm AS piece_z_mm, sf.sha256 AS piece_sha256
     FROM entries e JOIN users u ON u.id = e.entrant_id JOIN machines m ON m.id = e.machine_id JOIN seasons s ON s.id = e.season_id JOIN classes c ON c.id = e.class_id
     LEFT JOIN test_pieces tp ON tp.season_id = s.id LEFT JOIN stored_files sf ON sf.id = tp.stored_file_id
     ${LATEST_INSPECTION}
     WHERE ${where} = ? AND e.state = 'verified' AND s.state <> 'draft'
     ORDER BY s.opens_at DESC, c.display_order, e.claimed_time_ms, e.id
     LIMIT 1000`,
    [id],
  );
  const ranks = new Map<number, number>();
  const groups = new Map<string, HistoryRow[]>();
  for (const r of rows) groups.set(`${r.season_id}/${r.class_id}`, [...(groups.get(`${r.season_id}/${r.class_id}`) ?? []), r]);
  for (const g of groups.values()) {
    const frozen = isFrozenState(g[0].season_state);
    if (frozen) await ensureFrozen(g[0].season_id);
    for (const [k, v] of await ranksOf({ seasonId: g[0].season_id, classId: g[0].class_id, frozen }, g.map((r) => r.id))) ranks.set(k, v);
  }
  return rows.map((r) => ({
    entry_id: r.id,
    season: { slug: r.season_slug, name: r.season_name, opens_at: isoDate(r.opens_at) },
    class: { slug: r.class_slug, name: r.class_name },
    entrant: { id: r.entrant_id, name: r.entrant_name },
    machine: { id: r.machine_id, name: r.machine_name },
    test_piece: pieceOf(r),
    time_ms: r.claimed_time_ms,
    rank: ranks.get(r.id) ?? null,
    material: r.material_family,
    peak_flow_mm3s: r.peak_flow_mm3s,
    date: isoDate(r.submitted_at),
  }));
}

/** One point per season and class: the entrant's best verified time there, with the season's test piece (the chart draws one line per piece). */
export function bestPerSeason(entries: HistoryEntry[]) {
  const best = new Map<string, HistoryEntry>();
  for (const e of entries) {
    const k = `${e.season.slug}/${e.class.slug}`;
    const b = best.get(k);
    if (!b || e.time_ms < b.time_ms) best.set(k, e);
  }
  return [...best.values()]
    .sort((a, b) => String(a.season.opens_at).localeCompare(String(b.season.opens_at)))
    .map((e) => ({ season: e.season.name, opens_at: e.season.opens_at, class: e.class.name, piece: e.test_piece ?? { key: 'none', name: 'no published test piece' }, time_s: e.time_ms / 1000, rank: e.rank }));
}

export async function entrantHistory(id: number) {
  const entries = await history('e.entrant_id', id);
  if (!entries.length) throw notFound('This entrant has no verified entry yet.');
  return { entrant: entries[0].entrant, entries, best_per_season: bestPerSeason(entries) };
}

export async function machineHistory(id: number) {
  const [m] = await select<{ id: number; name: string; motion_system: string; build_x_mm: number; build_y_mm: number; build_z_mm: number; nozzle_mm: number; hotend: string; extruder: string; firmware: string; modifications: string; owner_id: number; owner_name: string }>(
    'SELECT m.*, u.name AS owner_name FROM machines m JOIN users u ON u.id = m.owner_id WHERE m.id = ?',
    [id],
  );
  const entries = m ? await history('e.machine_id', id) : [];
  if (!m || !entries.length) throw notFound('This machine has no verified entry yet.');
  return {
    machine: { id: m.id, name: m.name, motion: m.motion_system, build_volume_mm: { x: m.build_x_mm, y: m.build_y_mm, z: m.build_z_mm }, nozzle_mm: m.nozzle_mm, hotend: m.hotend, extruder: m.extruder, firmware: m.firmware, modifications: m.modifications, owner: { id: m.owner_id, name: m.owner_name } },
    entries,
    best_per_season: bestPerSeason(entries),
  };
}
