import { describe, expect, it } from 'vitest';
import { describeAuditEvent } from '@/src/components/settings/audit-text';

const event = (action: string, details: unknown, targetId: string | null = null) => ({
  action,
  targetType: 'user',
  targetId,
  details,
});

describe('describeAuditEvent', () => {
  it('says who changed which role from what to what', () => {
    expect(describeAuditEvent(event('member.role', { email: 'ines@fen.example', from: 'viewer', to: 'admin' }))).toBe(
      'Changed the role of ines@fen.example from viewer to admin',
    );
  });

  it('tells a replaced invitation from one revoked by hand', () => {
    expect(describeAuditEvent(event('invitation.revoke', { email: 'a@fen.example', reason: 'replaced' }))).toMatch(
      /replaced by a new one/,
    );
    expect(describeAuditEvent(event('invitation.revoke', { email: 'a@fen.example' }))).toBe(
      'Revoked the invitation of a@fen.example',
    );
  });

  it('shows an action it does not know with its target and details, so no event is hidden', () => {
    expect(describeAuditEvent(event('webhook.remove', { email: 'list@fen.example' }, 'sub-1'))).toBe(
      'webhook.remove user sub-1 {"email":"list@fen.example"}',
    );
  });

  it('marks missing details with a question mark instead of throwing', () => {
    expect(describeAuditEvent(event('token.create', null))).toBe('Created CI token "?" (?)');
  });
});
