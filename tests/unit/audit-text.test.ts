/** The audit log in words: every action kind has a label and a sentence without raw JSON. */
import { describe, expect, it } from 'vitest';
import { AUDIT_ACTIONS } from '@/lib/domain';
import { AUDIT_ACTION_LABELS, auditDetailPairs, auditSentence } from '@/lib/auditText';

const names = { actor: 'Rowan Pike', users: new Map([[7, 'Pim Okafor']]), seasons: new Map([[3, 'Winter Sprint']]), machines: new Map([[5, 'Harrier 300']]) };

describe('audit sentences', () => {
  it('says who changed whose roles from what to what', () => {
    expect(auditSentence({ action: 'user.roles_changed', subjectType: 'user', subjectId: '7', details: { before: ['entrant'], after: ['entrant', 'judge'] } }, names))
      .toBe('Rowan Pike changed Pim Okafor’s roles from Entrant to Entrant, Judge.');
  });
  it('names decisions, reasons and counts', () => {
    const s = auditSentence({ action: 'review.decided', subjectType: 'entry', subjectId: '12', details: { decision: 'verify', reasonCodes: [], verifications: 1, verificationsRequired: 2 } }, names);
    expect(s).toBe('Rowan Pike verified entry #12; 1 of 2 verifications.');
  });
  it('falls back to "The system" and ids when names are unknown', () => {
    expect(auditSentence({ action: 'season.reinspect_requested', subjectType: 'season', subjectId: '9', details: { reason: 'rules changed', queued: 4 } }, { ...names, actor: null }))
      .toBe('The system asked for the entries of season #9 to be inspected again (rules changed); 4 inspections queued.');
  });
  it('has a label and a JSON-free sentence for every action', () => {
    for (const action of AUDIT_ACTIONS) {
      expect(AUDIT_ACTION_LABELS[action]).toBeTruthy();
      const s = auditSentence({ action, subjectType: 'season', subjectId: '3', details: { userId: 7, changed: ['name'], before: 2, after: 3, from: 'open', to: 'judging' } }, names);
      expect(s, action).toMatch(/^[A-Z].*\.$/);
      expect(s, action).not.toMatch(/[{}"]|undefined|\[object/);
    }
  });
  it('shows details as readable pairs', () => {
    expect(auditDetailPairs({ limitFlowMm3s: 24.5, changed: ['name', 'opens_at'], sizeMm: { x: 20, y: 20 } })).toEqual([
      ['limit flow mm3s', '24.5'], ['changed', 'name, opens_at'], ['size mm', 'x 20, y 20'],
    ]);
  });
});
