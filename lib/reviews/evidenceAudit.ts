/** The evidence-view audit: every look at an entrant's private evidence by a judge is logged. */
import { audit } from '@/lib/audit';

/** What a judge looked at; other file routes that serve private evidence to judges call this too. */
export type EvidenceView = 'review' | 'photo' | 'gcode' | 'project' | 'evidence_link' | 'toolpath_preview';

export async function auditEvidenceView(actorId: number, entryId: number, view: EvidenceView, extra: { fileId?: number; url?: string; ip?: string | null } = {}) {
  const { ip, ...details } = extra;
  await audit('evidence.viewed', { type: 'entry', id: entryId }, { actorId, ip: ip ?? null, details: { view, ...details } });
}

