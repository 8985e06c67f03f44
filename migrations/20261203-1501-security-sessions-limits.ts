/**
 * Sign-in security:
 * - `rate_limits` replaces `throttles`: rate-limiter-flexible's counters (key, points, window end
 *   in ms), written with one atomic upsert per attempt (lib/auth/limiterStore.ts).
 * - `users.session_version`: sessions carry the version they were issued under; a password change
 *   or reset, "sign out everywhere" and a role change bump it, ending older sessions.
 * - `revoked_sessions`: the session ids signed out on one device (kept until the session would
 *   have expired anyway).
 */
import { DataTypes, type QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('throttles');
  await qi.createTable('rate_limits', {
    rl_key: { type: DataTypes.STRING(400), primaryKey: true },
    points: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    expire: { type: DataTypes.BIGINT, allowNull: true },
  });
  await qi.addIndex('rate_limits', ['expire']);
  await qi.addColumn('users', 'session_version', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await qi.createTable('revoked_sessions', {
    sid: { type: DataTypes.STRING(64), primaryKey: true },
    expires_at: { type: DataTypes.BIGINT, allowNull: false },
  });
  await qi.addIndex('revoked_sessions', ['expires_at']);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('revoked_sessions');
  await qi.removeColumn('users', 'session_version');
  await qi.dropTable('rate_limits');
  await qi.createTable('throttles', {
    key: { type: DataTypes.STRING(300), primaryKey: true },
    failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    window_start: { type: DataTypes.DATE, allowNull: false },
    locked_until: { type: DataTypes.DATE, allowNull: true },
  });
}
