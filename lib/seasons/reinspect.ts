/**
 * Re-inspection of a whole season (after a rulebook change, or on the organizer's request): each
 * entry with a G-code gets a new inspection row in state `queued` for its current file; old rows
 * stay, so judges can compare what changed. The rows are created inside the caller's transaction;
 * `startQueued` hands them to the entrant side's inspection queue once that transaction committed.
 */
import { Op, type Transaction } from 'sequelize';
import { Entry, Inspection, Season } from '@/models';
import { currentGcode, queueInspection, queueInspectionRow } from '@/lib/entries/inspection';

export interface Reinspection {
  /** inspections newly queued */
  queued: number;
  /** entries already waiting for a queued or running inspection of their current file */
  alreadyQueued: number;
  /** entries without a G-code yet (nothing to re-run) */
  withoutFile: number;
  inspectionIds: number[];
}

/**
 * `states` narrows which entries are re-run (default: every entry not withdrawn); `markSeason`
 * (default true) records the request on the season, as an organizer's explicit request does.
 */
export async function reinspectSeason(seasonId: number, opts: { transaction?: Transaction; now?: Date; states?: string[]; markSeason?: boolean } = {}): Promise<Reinspection> {
  const { transaction } = opts;
  const now = opts.now ?? new Date();
  const state = opts.states ? { [Op.in]: opts.states.filter((s) => s !== 'withdrawn') } : { [Op.ne]: 'withdrawn' };
  const entries = await Entry.findAll({ where: { seasonId, state }, attributes: ['id'], transaction });
  const out: Reinspection = { queued: 0, alreadyQueued: 0, withoutFile: 0, inspectionIds: [] };
  for (const entry of entries) {
    const gcode = await currentGcode(entry.id, transaction);
    if (!gcode) {
      out.withoutFile += 1;
      continue;
    }
    const pending = await Inspection.findOne({ where: { entryId: entry.id, storedFileId: gcode.id, status: ['queued', 'running'] }, transaction });
    if (pending) {
      out.alreadyQueued += 1;
      continue;
    }
    // The same queue as uploads: one queued row per entry, taken fairly across entrants.
    const { row } = await queueInspectionRow(entry.id, gcode.id, transaction);
    out.inspectionIds.push(row.id);
    out.queued += 1;
  }
  if (opts.markSeason !== false) await Season.update({ reinspectRequestedAt: now }, { where: { id: seasonId }, transaction });
  return out;
}

/** Wakes the job runner for the queued inspections (call after the transaction that created them committed). */
export function startQueued(r: Reinspection | null) {
  if (r?.inspectionIds.length) queueInspection();
}
