/**
 * Hotlap's vocabulary as data: every role, state and enumerated value is defined here once and
 * imported by models, route handlers, pages and tests.
 */
import { z } from 'zod';

export const ROLES = ['entrant', 'judge', 'organizer', 'admin'] as const;
export type Role = (typeof ROLES)[number];
export const RoleSchema = z.enum(ROLES);
export const ROLE_LABELS: Record<Role, string> = {
  entrant: 'Entrant',
  judge: 'Judge',
  organizer: 'Organizer',
  admin: 'Admin',
};

/** Season lifecycle, in order. */
export const SEASON_STATES = ['draft', 'open', 'judging', 'final', 'archived'] as const;
export type SeasonState = (typeof SEASON_STATES)[number];

/** Entry lifecycle. `returned` entries may be resubmitted; `withdrawn` is the entrant's own act. */
export const ENTRY_STATES = ['draft', 'submitted', 'verified', 'rejected', 'returned', 'withdrawn'] as const;
export type EntryState = (typeof ENTRY_STATES)[number];

export const MOTION_SYSTEMS = ['corexy', 'cartesian', 'delta', 'other'] as const;
export type MotionSystem = (typeof MOTION_SYSTEMS)[number];
export const MOTION_SYSTEM_LABELS: Record<MotionSystem, string> = {
  corexy: 'CoreXY',
  cartesian: 'Cartesian bed-slinger',
  delta: 'Delta',
  other: 'Other',
};

export const MODIFICATION_CLASSES = ['stock', 'modified', 'any'] as const;

export const STORED_FILE_KINDS = ['gcode', 'photo', 'thumbnail', 'project', 'test_piece'] as const;
export type StoredFileKind = (typeof STORED_FILE_KINDS)[number];

export const INSPECTION_STATUSES = ['queued', 'running', 'done', 'failed'] as const;
export type InspectionStatus = (typeof INSPECTION_STATUSES)[number];

export const REVIEW_DECISIONS = ['verify', 'reject', 'return'] as const;
export type ReviewDecision = (typeof REVIEW_DECISIONS)[number];

export const TOKEN_PURPOSES = ['verify', 'reset'] as const;
export type TokenPurpose = (typeof TOKEN_PURPOSES)[number];

/** Audit actions written by the app. */
export const AUDIT_ACTIONS = [
  'user.signup',
  'user.sessions_ended',
  'user.verify',
  'user.password_reset',
  'user.roles_changed',
  'season.created',
  'season.updated',
  'season.test_piece_uploaded',
  'season.class_created',
  'season.class_updated',
  'season.class_deleted',
  'season.classes_reordered',
  'season.rules_saved',
  'season.reinspect_requested',
  'season.state_changed',
  'season.judge_appointed',
  'season.judge_removed',
  'season.judge_invited',
  'season.judge_invitation_accepted',
  'season.organizer_added',
  'season.organizer_removed',
  'entry.reopened_by_reinspection',
  'review.decided',
  'evidence.viewed',
  'machine.created',
  'machine.updated',
  'machine.retired',
  'machine.extrusion_test_recorded',
  'entry.created',
  'entry.files_replaced',
  'entry.submitted',
  'entry.withdrawn',
  'entry.reinspected',
] as const;
export type AuditAction = (typeof AUDIT_ACTIONS)[number];

export const PASSWORD_MIN_LENGTH = 10;
