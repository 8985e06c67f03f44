/**
 * The audit log in words: a label and a sentence per action kind, from the event's stored details
 * and the names of the people and things it refers to. Pure (no database), so the server page, the
 * API and tests share it.
 */
import { AUDIT_ACTIONS, ROLE_LABELS, type AuditAction, type Role } from '@/lib/domain';
import { DECISION_LABELS, reasonLabel } from '@/lib/reviews/reasons';

/** Rows per page the audit log offers. */
export const AUDIT_PER_PAGE = [25, 50, 100] as const;

export const AUDIT_ACTION_LABELS: Record<AuditAction, string> = {
  'user.signup': 'Signed up',
  'user.sessions_ended': 'Signed out everywhere',
  'user.verify': 'E-mail confirmed',
  'user.password_reset': 'Password reset',
  'user.roles_changed': 'Roles changed',
  'season.created': 'Season created',
  'season.updated': 'Season edited',
  'season.test_piece_uploaded': 'Test piece uploaded',
  'season.class_created': 'Class added',
  'season.class_updated': 'Class edited',
  'season.class_deleted': 'Class deleted',
  'season.classes_reordered': 'Classes reordered',
  'season.rules_saved': 'Rulebook saved',
  'season.reinspect_requested': 'Re-inspection requested',
  'season.state_changed': 'Season state changed',
  'season.judge_appointed': 'Judge appointed',
  'season.judge_removed': 'Judge removed',
  'season.judge_invited': 'Judge invited',
  'season.judge_invitation_accepted': 'Judge invitation accepted',
  'season.organizer_added': 'Co-organizer added',
  'season.organizer_removed': 'Co-organizer removed',
  'entry.reopened_by_reinspection': 'Entry back with the judges',
  'review.decided': 'Review decision',
  'evidence.viewed': 'Evidence opened',
  'machine.created': 'Machine added',
  'machine.updated': 'Machine edited',
  'machine.retired': 'Machine retired or restored',
  'machine.extrusion_test_recorded': 'Extrusion test recorded',
  'entry.created': 'Entry started',
  'entry.files_replaced': 'Entry files replaced',
  'entry.submitted': 'Entry submitted',
  'entry.withdrawn': 'Entry withdrawn',
  'entry.reinspected': 'Inspection run again',
};

export const isAuditAction = (a: string): a is AuditAction => (AUDIT_ACTIONS as readonly string[]).includes(a);
export const auditActionLabel = (a: string) => (isAuditAction(a) ? AUDIT_ACTION_LABELS[a] : a);

const EVIDENCE_VIEWS: Record<string, string> = {
  review: 'review page', photo: 'photo', gcode: 'G-code', project: 'project file', evidence_link: 'evidence link', toolpath_preview: 'toolpath preview',
};

/** Names the sentence can use; anything missing is named by its id. */
export interface AuditNames {
  actor: string | null;
  users: Map<number, string>;
  seasons: Map<number, string>;
  machines: Map<number, string>;
}

export interface AuditEventData {
  action: string;
  subjectType: string;
  subjectId: string;
  details: Record<string, unknown>;
}

const list = (xs: unknown) => (Array.isArray(xs) && xs.length ? xs.map(String).join(', ') : 'none');
const roles = (xs: unknown) => (Array.isArray(xs) && xs.length ? xs.map((r) => ROLE_LABELS[r as Role] ?? String(r)).join(', ') : 'no role');
/** A stored value as text, or the fallback when it is missing. */
const str = (v: unknown, fallback: string) => (v == null || v === '' ? fallback : String(v));
const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** One sentence saying what happened, e.g. "Rowan Pike changed Pim Ash's roles from Entrant to Entrant, Judge." */
export function auditSentence(e: AuditEventData, n: AuditNames): string {
  const d = e.details ?? {};
  const who = n.actor ?? 'The system';
  const id = Number(e.subjectId);
  const user = (uid: unknown) => n.users.get(Number(uid)) ?? `user #${uid}`;
  const season = n.seasons.get(id) ?? `season #${e.subjectId}`;
  const machine = n.machines.get(id) ?? (typeof d.name === 'string' ? d.name : `machine #${e.subjectId}`);
  const entry = `entry #${e.subjectId}`;
  const action = e.action as AuditAction;
  switch (action) {
    case 'user.signup': return `${who} signed up.`;
    case 'user.sessions_ended': return `${who} signed out on every device.`;
    case 'user.verify': return `${who} confirmed their e-mail address.`;
    case 'user.password_reset': return `${who} set a new password through a reset link.`;
    case 'user.roles_changed':
      return `${who} changed ${user(id)}’s roles from ${roles(d.before)} to ${roles(d.after)}${typeof d.reason === 'string' && d.reason ? ` (${d.reason})` : ''}.`;
    case 'season.created': return `${who} created the season ${str(d.name, season)}${d.slug ? ` (${d.slug})` : ''}.`;
    case 'season.updated': return `${who} edited ${season}: ${list(d.changed)}.`;
    case 'season.test_piece_uploaded':
      return `${who} uploaded the test piece ${str(d.file, 'file')} to ${season}${num(d.triangles) != null ? ` (${d.triangles} triangles)` : ''}.`;
    case 'season.class_created': return `${who} added the class ${str(d.slug ?? d.classId, 'a class')} to ${season}.`;
    case 'season.class_updated': return `${who} edited the class ${str(d.slug ?? d.classId, 'a class')} of ${season}.`;
    case 'season.class_deleted':
      return `${who} deleted the class ${str(d.slug ?? d.classId, 'a class')} of ${season}${num(d.rulesRemoved) ? ` and its ${d.rulesRemoved} rule${d.rulesRemoved === 1 ? '' : 's'}` : ''}.`;
    case 'season.classes_reordered': return `${who} changed the order of the classes of ${season}.`;
    case 'season.rules_saved':
      return `${who} saved the rulebook of ${season}: ${d.after ?? '?'} rule${d.after === 1 ? '' : 's'} (before: ${d.before ?? '?'})${d.reinspect ? '; entries are inspected again' : ''}.`;
    case 'season.reinspect_requested':
      return `${who} asked for the entries of ${season} to be inspected again (${String(d.reason ?? 'no reason given')})${num(d.queued) != null ? `; ${d.queued} inspection${d.queued === 1 ? '' : 's'} queued` : ''}${num(d.withoutFile) ? `, ${d.withoutFile} without a G-code` : ''}.`;
    case 'season.state_changed':
      return `${who} moved ${season} from ${str(d.from, '?')} to ${str(d.to, '?')}${d.notify ? ', notifying subscribers' : ''}${num(d.standingsRows) != null ? `; ${d.standingsRows} standings rows frozen` : ''}.`;
    case 'season.judge_appointed': return `${who} appointed ${user(d.userId)} as a judge of ${season}.`;
    case 'season.judge_removed': return `${who} removed ${user(d.userId)} from the judges of ${season}.`;
    case 'season.judge_invited': return `${who} invited ${String(d.email ?? 'someone')} to judge ${season}.`;
    case 'season.judge_invitation_accepted': return `${who} accepted the invitation to judge ${season}.`;
    case 'season.organizer_added': return `${who} added ${user(d.userId)} as a co-organizer of ${season}.`;
    case 'season.organizer_removed': return `${who} removed ${user(d.userId)} from the organizers of ${season}.`;
    case 'entry.reopened_by_reinspection':
      return `A re-inspection sent ${entry} back to the judges (${String(d.fromState ?? '?')} → ${String(d.toState ?? '?')})${Array.isArray(d.changed) && d.changed.length ? `; changed: ${list(d.changed)}` : ''}.`;
    case 'review.decided': {
      const past = DECISION_LABELS[d.decision as keyof typeof DECISION_LABELS]?.past ?? str(d.decision, 'decided on');
      const reasons = Array.isArray(d.reasonCodes) && d.reasonCodes.length ? ` (${d.reasonCodes.map((c) => reasonLabel(String(c))).join('; ')})` : '';
      const count = num(d.verifications) != null && num(d.verificationsRequired) != null ? `; ${d.verifications} of ${d.verificationsRequired} verifications` : '';
      return `${who} ${past} ${entry}${reasons}${count}.`;
    }
    case 'evidence.viewed': return `${who} opened the ${EVIDENCE_VIEWS[String(d.view)] ?? String(d.view ?? 'evidence')} of ${entry}.`;
    case 'machine.created': return `${who} added the machine ${machine}.`;
    case 'machine.updated': return `${who} edited the machine ${machine}.`;
    case 'machine.retired': return `${who} ${d.retired === false ? 'put back into use' : 'retired'} the machine ${machine}.`;
    case 'machine.extrusion_test_recorded':
      return `${who} recorded an extrusion test for ${machine}${num(d.limitFlowMm3s) != null ? `: limit ${d.limitFlowMm3s} mm³/s` : ': no limit found'}.`;
    case 'entry.created': return `${who} started ${entry}.`;
    case 'entry.files_replaced': {
      const parts = [d.gcode ? 'the G-code' : null, num(d.photos) ? `${d.photos} photo${d.photos === 1 ? '' : 's'}` : null, d.project ? 'the project file' : null].filter(Boolean);
      return `${who} replaced ${parts.length ? parts.join(', ') : 'files'} of ${entry}.`;
    }
    case 'entry.submitted': return `${who} ${d.resubmitted ? 'submitted again' : 'submitted'} ${entry}.`;
    case 'entry.withdrawn': return `${who} withdrew ${entry}${d.from ? ` (it was ${String(d.from)})` : ''}.`;
    case 'entry.reinspected': return `${who} asked for ${entry} to be inspected again.`;
    default: return `${who}: ${e.action} on ${e.subjectType} #${e.subjectId}.`;
  }
}

/** The stored details as "field: value" pairs for people (no braces or quotes). */
export function auditDetailPairs(details: Record<string, unknown>): [string, string][] {
  const show = (v: unknown): string =>
    v == null ? '—' : Array.isArray(v) ? v.map(show).join(', ') || 'none' : typeof v === 'object' ? Object.entries(v as object).map(([k, x]) => `${k} ${show(x)}`).join(', ') : String(v);
  return Object.entries(details ?? {}).map(([k, v]) => [k.replace(/([a-z])([A-Z])/g, '$1 $2').replace(/_/g, ' ').toLowerCase(), show(v)]);
}
