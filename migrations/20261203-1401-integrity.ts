/**
 * Which inspection an entrant submitted (judges may verify only while it is still the current one),
 * and the mail outbox: sent_mails rows are written in the transaction of the change that causes
 * them and delivered after commit, with attempts, the next attempt's time and the last error.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('entries', 'submitted_inspection_id', {
    type: DataTypes.INTEGER,
    allowNull: true,
    references: { model: 'inspections', key: 'id' },
    onDelete: 'SET NULL',
  });
  // Entries submitted before this column existed were submitted with their latest inspection.
  await qi.sequelize.query(
    `UPDATE entries SET submitted_inspection_id = (SELECT MAX(i.id) FROM inspections i WHERE i.entry_id = entries.id)
     WHERE state IN ('submitted', 'verified', 'returned', 'rejected')`,
  );
  // Rows written before the outbox were sent at once.
  await qi.addColumn('sent_mails', 'status', { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'sent' });
  await qi.addColumn('sent_mails', 'attempts', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await qi.addColumn('sent_mails', 'next_attempt_at', { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn('sent_mails', 'last_error', { type: DataTypes.TEXT, allowNull: true });
  await qi.addColumn('sent_mails', 'sent_at', { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn('sent_mails', 'sealed', { type: DataTypes.TEXT, allowNull: true });
  await qi.addIndex('sent_mails', ['status', 'next_attempt_at'], { name: 'sent_mails_due' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeIndex('sent_mails', 'sent_mails_due');
  for (const c of ['sealed', 'sent_at', 'last_error', 'next_attempt_at', 'attempts', 'status']) await qi.removeColumn('sent_mails', c);
  await qi.removeColumn('entries', 'submitted_inspection_id');
}
