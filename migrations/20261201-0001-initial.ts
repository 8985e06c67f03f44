/** Initial schema: every entity of the product, with the keys and indexes standings and queues use. */
import { DataTypes, type QueryInterface } from 'sequelize';
import { jsonColumnType } from '../lib/dbDialect';

const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
const stamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};
const fk = (table: string, allowNull = false, onDelete: 'CASCADE' | 'SET NULL' | 'RESTRICT' = 'CASCADE') => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: table, key: 'id' },
  onDelete,
});
const text = (n: number, defaultValue?: string) =>
  defaultValue === undefined
    ? { type: DataTypes.STRING(n), allowNull: false }
    : { type: DataTypes.STRING(n), allowNull: false, defaultValue };
const num = (allowNull = false) => ({ type: DataTypes.DOUBLE, allowNull });
// JSON documents: JSONB on PostgreSQL, JSON text on SQLite (lib/dbDialect.ts).
const json = (qi: QueryInterface, defaultValue: unknown) => ({ type: jsonColumnType(qi.sequelize), allowNull: false, defaultValue });

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('users', {
    id,
    email: { ...text(254), unique: true },
    name: text(80),
    password_hash: text(100),
    roles: json(qi, ['entrant']),
    email_verified_at: { type: DataTypes.DATE, allowNull: true },
    ...stamps,
  });
  await qi.createTable('auth_tokens', {
    id,
    user_id: fk('users'),
    purpose: text(16),
    token_hash: { ...text(64), unique: true },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
    ...stamps,
  });
  await qi.addIndex('auth_tokens', ['user_id', 'purpose']);
  await qi.createTable('throttles', {
    key: { type: DataTypes.STRING(300), primaryKey: true },
    failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    window_start: { type: DataTypes.DATE, allowNull: false },
    locked_until: { type: DataTypes.DATE, allowNull: true },
  });
  await qi.createTable('seasons', {
    id,
    slug: { ...text(64), unique: true },
    name: text(120),
    host_name: text(120),
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    state: text(16, 'draft'),
    opens_at: { type: DataTypes.DATE, allowNull: false },
    closes_at: { type: DataTypes.DATE, allowNull: false },
    time_zone: text(64, 'UTC'),
    timing_convention: text(300, 'First extrusion to last extrusion'),
    photos_required: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 2 },
    video_required: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    entry_limit: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 3 },
    verifications_required: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    rules_frozen_at: { type: DataTypes.DATE, allowNull: true },
    created_by_id: fk('users', true, 'SET NULL'),
    ...stamps,
  });
  await qi.addIndex('seasons', ['state']);
  await qi.createTable('stored_files', {
    id,
    owner_id: fk('users', true, 'SET NULL'),
    entry_id: { type: DataTypes.INTEGER, allowNull: true }, // FK added with entries below (SQLite: declared inline there)
    kind: text(16),
    original_name: text(255),
    mime: text(100),
    size_bytes: { type: DataTypes.INTEGER, allowNull: false },
    sha256: text(64),
    storage_key: { ...text(300), unique: true },
    meta: json(qi, {}),
    ...stamps,
  });
  await qi.addIndex('stored_files', ['entry_id', 'kind']);
  await qi.addIndex('stored_files', ['sha256']);
  await qi.createTable('test_pieces', {
    id,
    season_id: { ...fk('seasons'), unique: true },
    stored_file_id: fk('stored_files', true, 'SET NULL'),
    name: text(120),
    format: text(8),
    triangle_count: { type: DataTypes.INTEGER, allowNull: false },
    size_x_mm: num(),
    size_y_mm: num(),
    size_z_mm: num(),
    volume_mm3: num(),
    ...stamps,
  });
  await qi.createTable('season_judges', {
    season_id: { ...fk('seasons'), primaryKey: true },
    user_id: { ...fk('users'), primaryKey: true },
    appointed_by_id: fk('users', true, 'SET NULL'),
    ...stamps,
  });
  await qi.addIndex('season_judges', ['user_id']);
  await qi.createTable('classes', {
    id,
    season_id: fk('seasons'),
    slug: text(64),
    name: text(120),
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    nozzle_diameters_mm: json(qi, []),
    nozzle_min_mm: num(true),
    material_families: json(qi, []),
    motion_systems: json(qi, []),
    build_volume_min_mm: num(true),
    build_volume_max_mm: num(true),
    modification: text(16, 'any'),
    display_order: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    ...stamps,
  });
  await qi.addIndex('classes', ['season_id', 'slug'], { unique: true });
  await qi.createTable('rules', {
    id,
    season_id: fk('seasons'),
    class_id: fk('classes', true),
    metric: text(64),
    comparator: text(16),
    value: num(),
    value_max: num(true),
    tolerance: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    severity: text(16),
    sentence: text(300, ''),
    position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    ...stamps,
  });
  await qi.addIndex('rules', ['season_id', 'class_id', 'position']);
  await qi.createTable('machines', {
    id,
    owner_id: fk('users'),
    name: text(120),
    motion_system: text(16),
    build_x_mm: num(),
    build_y_mm: num(),
    build_z_mm: num(),
    nozzle_mm: num(),
    hotend: text(200, ''),
    extruder: text(200, ''),
    firmware: text(200, ''),
    max_accel_mm_s2: num(true),
    max_speed_mms: num(true),
    modifications: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    is_modified: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    retired_at: { type: DataTypes.DATE, allowNull: true },
    ...stamps,
  });
  await qi.addIndex('machines', ['owner_id']);
  await qi.createTable('extrusion_tests', {
    id,
    machine_id: fk('machines'),
    material_family: text(16),
    material_name: text(120, ''),
    filament_diameter_mm: num(),
    sample_length_mm: num(),
    reference_mass_g: num(),
    threshold_percent: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 98 },
    steps: json(qi, []),
    limit_flow_mm3s: num(true),
    tested_at: { type: DataTypes.DATE, allowNull: false },
    ...stamps,
  });
  await qi.addIndex('extrusion_tests', ['machine_id', 'material_family']);
  await qi.createTable('entries', {
    id,
    season_id: fk('seasons', false, 'RESTRICT'),
    class_id: fk('classes', false, 'RESTRICT'),
    entrant_id: fk('users', false, 'RESTRICT'),
    machine_id: fk('machines', false, 'RESTRICT'),
    material_family: text(16),
    material_name: text(120, ''),
    nozzle_mm: num(),
    claimed_time_ms: { type: DataTypes.INTEGER, allowNull: false },
    evidence_url: text(500, ''),
    measured_x_mm: num(true),
    measured_y_mm: num(true),
    measured_z_mm: num(true),
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    state: text(16, 'draft'),
    gcode_sha256: { type: DataTypes.STRING(64), allowNull: true },
    submitted_at: { type: DataTypes.DATE, allowNull: true },
    decided_at: { type: DataTypes.DATE, allowNull: true },
    ...stamps,
  });
  // Standings: verified entries of one class ordered by time, ties by submission.
  await qi.addIndex('entries', ['season_id', 'class_id', 'state', 'claimed_time_ms', 'submitted_at'], { name: 'entries_standings' });
  // Judge queue: submitted entries oldest first.
  await qi.addIndex('entries', ['state', 'submitted_at'], { name: 'entries_queue' });
  await qi.addIndex('entries', ['entrant_id', 'season_id']);
  await qi.addIndex('entries', ['gcode_sha256']);
  await qi.createTable('inspections', {
    id,
    entry_id: fk('entries'),
    stored_file_id: fk('stored_files', true, 'SET NULL'),
    engine_version: text(32),
    status: text(16, 'queued'),
    report: { type: jsonColumnType(qi.sequelize), allowNull: true },
    rule_results: json(qi, []),
    flags: json(qi, []),
    blocking_failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    advisory_flags: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    peak_flow_mm3s: num(true),
    p95_flow_mm3s: num(true),
    estimated_time_s: num(true),
    layer_height_mm: num(true),
    error: { type: DataTypes.TEXT, allowNull: true },
    finished_at: { type: DataTypes.DATE, allowNull: true },
    ...stamps,
  });
  await qi.addIndex('inspections', ['entry_id', 'created_at']);
  await qi.createTable('reviews', {
    id,
    entry_id: fk('entries'),
    judge_id: fk('users', false, 'RESTRICT'),
    decision: text(16),
    reason_codes: json(qi, []),
    note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    checklist: json(qi, {}),
    ...stamps,
  });
  await qi.addIndex('reviews', ['entry_id', 'created_at']);
  await qi.addIndex('reviews', ['judge_id']);
  await qi.createTable('audit_events', {
    id,
    actor_id: fk('users', true, 'SET NULL'),
    action: text(64),
    subject_type: text(32),
    subject_id: text(64),
    details: json(qi, {}),
    ip: { type: DataTypes.STRING(64), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('audit_events', ['created_at']);
  await qi.addIndex('audit_events', ['subject_type', 'subject_id']);
  await qi.createTable('sent_mails', {
    id,
    to: text(254),
    subject: text(300),
    text: { type: DataTypes.TEXT, allowNull: false },
    html: { type: DataTypes.TEXT, allowNull: false },
    transport: text(8),
    message_id: { type: DataTypes.STRING(300), allowNull: true },
    raw: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('sent_mails', ['to', 'created_at']);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const t of [
    'sent_mails', 'audit_events', 'reviews', 'inspections', 'entries', 'extrusion_tests', 'machines',
    'rules', 'classes', 'season_judges', 'test_pieces', 'stored_files', 'seasons', 'throttles',
    'auth_tokens', 'users',
  ]) {
    await qi.dropTable(t);
  }
}
