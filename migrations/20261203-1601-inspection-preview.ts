/**
 * The judges' toolpath preview is built by the inspection pass and kept on the inspection row,
 * beside the report (its own column: list and standings queries that read `report` never load it).
 */
import { DataTypes, type QueryInterface } from 'sequelize';
import { jsonColumnType } from '../lib/dbDialect';

export async function up({ context: qi }: { context: QueryInterface }) {
  const cols = await qi.describeTable('inspections');
  if (!('preview' in cols)) await qi.addColumn('inspections', 'preview', { type: jsonColumnType(qi.sequelize), allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn('inspections', 'preview');
}
