/**
 * Integrity tables: when a re-inspection reopened an entry, co-organizers of a season (besides its creator), what a re-inspection changed
 * for an entry (kept for the judges and the public wording), and a G-code's content fingerprints
 * (of the decompressed bytes, and of the moves with comments and whitespace left out) so duplicates
 * are found whatever the compression or the comments.
 */
import { DataTypes, type QueryInterface } from 'sequelize';
import { jsonColumnType } from '../lib/dbDialect';

const stamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};
const fk = (table: string, allowNull = false, onDelete: 'CASCADE' | 'SET NULL' = 'CASCADE') => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: table, key: 'id' },
  onDelete,
});

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('entries', 'reopened_at', { type: DataTypes.DATE, allowNull: true });
  await qi.createTable('season_organizers', {
    season_id: { ...fk('seasons'), primaryKey: true },
    user_id: { ...fk('users'), primaryKey: true },
    added_by_id: fk('users', true, 'SET NULL'),
    ...stamps,
  });
  await qi.addIndex('season_organizers', ['user_id']);
  await qi.createTable('entry_reinspections', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    entry_id: fk('entries'),
    inspection_id: fk('inspections'),
    previous_inspection_id: fk('inspections', true, 'SET NULL'),
    from_state: { type: DataTypes.STRING(20), allowNull: false },
    to_state: { type: DataTypes.STRING(20), allowNull: false },
    changes: { type: jsonColumnType(qi.sequelize), allowNull: false, defaultValue: [] },
    ...stamps,
  });
  await qi.addIndex('entry_reinspections', ['entry_id']);
  await qi.addIndex('entry_reinspections', ['inspection_id'], { unique: true });
  await qi.createTable('gcode_fingerprints', {
    stored_file_id: { ...fk('stored_files'), primaryKey: true },
    content_sha256: { type: DataTypes.STRING(64), allowNull: false },
    moves_sha256: { type: DataTypes.STRING(64), allowNull: false },
    lines: { type: DataTypes.INTEGER, allowNull: false },
    ...stamps,
  });
  await qi.addIndex('gcode_fingerprints', ['content_sha256']);
  await qi.addIndex('gcode_fingerprints', ['moves_sha256']);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('gcode_fingerprints');
  await qi.dropTable('entry_reinspections');
  await qi.dropTable('season_organizers');
  await qi.removeColumn('entries', 'reopened_at');
}
