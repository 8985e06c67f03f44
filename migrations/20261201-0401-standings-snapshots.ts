/**
 * Frozen standings: when a season becomes final, its ranked rows are copied here so later decisions
 * (a late review, an edited machine name) can never change the published table.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  // One row per frozen season, even when a class had no verified entry at the time.
  await qi.createTable('standings_freezes', {
    season_id: { type: DataTypes.INTEGER, primaryKey: true, references: { model: 'seasons', key: 'id' }, onDelete: 'CASCADE' },
    rows: { type: DataTypes.INTEGER, allowNull: false },
    frozen_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.createTable('standings_snapshots', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    season_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'seasons', key: 'id' }, onDelete: 'CASCADE' },
    class_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'classes', key: 'id' }, onDelete: 'CASCADE' },
    rank: { type: DataTypes.INTEGER, allowNull: false },
    entry_id: { type: DataTypes.INTEGER, allowNull: false },
    entrant_id: { type: DataTypes.INTEGER, allowNull: false },
    entrant_name: { type: DataTypes.STRING(80), allowNull: false },
    machine_id: { type: DataTypes.INTEGER, allowNull: false },
    machine_name: { type: DataTypes.STRING(120), allowNull: false },
    motion_system: { type: DataTypes.STRING(16), allowNull: false },
    material_family: { type: DataTypes.STRING(16), allowNull: false },
    nozzle_mm: { type: DataTypes.DOUBLE, allowNull: false },
    claimed_time_ms: { type: DataTypes.INTEGER, allowNull: false },
    submitted_at: { type: DataTypes.DATE, allowNull: true },
    peak_flow_mm3s: { type: DataTypes.DOUBLE, allowNull: true },
    p95_flow_mm3s: { type: DataTypes.DOUBLE, allowNull: true },
    layer_height_mm: { type: DataTypes.DOUBLE, allowNull: true },
    verified_entries: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    frozen_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('standings_snapshots', ['season_id', 'class_id', 'rank'], { unique: true, name: 'standings_snapshots_rank' });
  await qi.addIndex('standings_snapshots', ['entry_id']);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('standings_snapshots');
  await qi.dropTable('standings_freezes');
}
