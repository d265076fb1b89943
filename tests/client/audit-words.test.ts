import { describe, expect, it } from 'vitest';
import type { AuditEntry } from '../../shared/types/admin';
import { auditSentence } from '../../src/views/admin/audit-words';

function entry(fields: Partial<AuditEntry>): AuditEntry {
  return {
    id: 1,
    at: '2026-04-07T09:15:00.000Z',
    actorId: 2,
    actorName: 'Tove Marrick',
    action: 'clip.upload',
    targetType: 'clip',
    targetId: '12',
    detail: {},
    ...fields,
  };
}

describe('audit entries in words', () => {
  it('reads as who did what to which thing, with the details in plain words', () => {
    expect(auditSentence(entry({ detail: { originalName: 'pass.mp4', sizeBytes: 2048 } }))).toBe(
      'Tove Marrick uploaded clip 12 (file: pass.mp4; size: 2048).',
    );
    expect(
      auditSentence(entry({ action: 'token.revoke', targetType: 'api_token', targetId: '4', detail: { ownerId: 3 } })),
    ).toBe('Tove Marrick revoked api token 4 (owner id: 3).');
  });

  it('names Kinefold for its own actions, and keeps an unknown action readable', () => {
    expect(auditSentence(entry({ actorName: null, action: 'clip.processed', detail: { flags: [] } }))).toBe(
      'Kinefold finished processing clip 12 (flags: none).',
    );
    expect(auditSentence(entry({ action: 'clip.rotate', detail: {} }))).toBe(
      'Tove Marrick did "clip.rotate" to clip 12.',
    );
  });
});
