/**
 * What running a season needs beyond the initial schema: evidence photo kinds, the moment standings
 * were frozen, the organizer's last re-inspection request, season subscriptions (announcement
 * mails) and judge invitations sent by e-mail.
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
  await qi.addColumn('seasons', 'photo_kinds', { type: jsonColumnType(qi.sequelize), allowNull: false, defaultValue: [] });
  await qi.addColumn('seasons', 'standings_frozen_at', { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn('seasons', 'reinspect_requested_at', { type: DataTypes.DATE, allowNull: true });
  await qi.createTable('season_subscriptions', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    season_id: fk('seasons'),
    user_id: fk('users'),
    ...stamps,
  });
  await qi.addIndex('season_subscriptions', ['season_id', 'user_id'], { unique: true });
  await qi.createTable('judge_invitations', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    season_id: fk('seasons'),
    email: { type: DataTypes.STRING(254), allowNull: false },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    invited_by_id: fk('users', true, 'SET NULL'),
    expires_at: { type: DataTypes.DATE, allowNull: false },
    accepted_at: { type: DataTypes.DATE, allowNull: true },
    accepted_by_id: fk('users', true, 'SET NULL'),
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    ...stamps,
  });
  await qi.addIndex('judge_invitations', ['season_id', 'email']);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('judge_invitations');
  await qi.dropTable('season_subscriptions');
  await qi.removeColumn('seasons', 'reinspect_requested_at');
  await qi.removeColumn('seasons', 'standings_frozen_at');
  await qi.removeColumn('seasons', 'photo_kinds');
}
