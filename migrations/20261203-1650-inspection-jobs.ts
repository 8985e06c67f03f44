/**
 * The inspections table becomes the job record of the inspection queue: how many times a job was
 * started (`attempts`), until when the server that took it holds it (`lease_until`; a running job
 * whose lease passed is taken again), and at most one queued inspection per entry.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('inspections', 'attempts', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await qi.addColumn('inspections', 'lease_until', { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn('inspections', 'claim_seq', { type: DataTypes.INTEGER, allowNull: true });
  await qi.addIndex('inspections', ['claim_seq'], { name: 'inspections_claim_seq' });
  // A stopped server can leave several queued rows for one entry (older uploads): keep the newest.
  await qi.sequelize.query(
    `UPDATE inspections SET status = 'failed', error = 'A newer G-code was queued before this inspection started.', finished_at = CURRENT_TIMESTAMP
     WHERE status = 'queued' AND id NOT IN (SELECT MAX(id) FROM inspections WHERE status = 'queued' GROUP BY entry_id)`,
  );
  await qi.sequelize.query(`CREATE UNIQUE INDEX inspections_one_queued_per_entry ON inspections (entry_id) WHERE status = 'queued'`);
  await qi.sequelize.query(`CREATE INDEX inspections_open_jobs ON inspections (status, lease_until) WHERE status IN ('queued', 'running')`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query('DROP INDEX IF EXISTS inspections_open_jobs');
  await qi.sequelize.query('DROP INDEX IF EXISTS inspections_one_queued_per_entry');
  await qi.removeIndex('inspections', 'inspections_claim_seq');
  await qi.removeColumn('inspections', 'claim_seq');
  await qi.removeColumn('inspections', 'lease_until');
  await qi.removeColumn('inspections', 'attempts');
}
