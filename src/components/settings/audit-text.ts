/**
 * One line of plain language for an audit event. Known actions get a sentence; anything newer
 * falls back to its action name and its details, so no event is ever hidden from the log.
 */
export interface AuditEventInput {
  action: string;
  targetType: string;
  targetId: string | null;
  details: unknown;
}

type Details = Record<string, unknown>;

const str = (d: Details, key: string): string =>
  typeof d[key] === 'string' || typeof d[key] === 'number' ? String(d[key]) : '?';

const SENTENCES: Record<string, (d: Details) => string> = {
  'member.invite': (d) => `Invited ${str(d, 'email')} as ${str(d, 'role')}`,
  'member.join': (d) => `Joined the workspace as ${str(d, 'role')}`,
  'member.role': (d) => `Changed the role of ${str(d, 'email')} from ${str(d, 'from')} to ${str(d, 'to')}`,
  'member.remove': (d) => `Removed ${str(d, 'email')} (${str(d, 'role')})`,
  'invitation.revoke': (d) =>
    `Revoked the invitation of ${str(d, 'email')}${d.reason === 'replaced' ? ' (replaced by a new one)' : ''}`,
  'token.create': (d) => `Created CI token "${str(d, 'name')}" (${str(d, 'prefix')})`,
  'token.revoke': (d) => `Revoked CI token "${str(d, 'name')}" (${str(d, 'prefix')})`,
  'mailing-list.saved': (d) => `Subscribed the mailing list ${str(d, 'email')}`,
  'mailing-list.removed': (d) => `Removed the mailing list ${str(d, 'email')}`,
  'case.policy.update': (d) =>
    `Changed the policy of case ${str(d, 'case')} in ${str(d, 'project')}${d.rejudged ? ' and re-judged its latest run' : ''}`,
  'project.settings.update': (d) => `Changed the settings of project ${str(d, 'project')}`,
  'baseline.accept': (d) =>
    `Accepted run ${str(d, 'runId').slice(0, 8)} as the baseline of ${str(d, 'case')} on ${str(d, 'branch')}`,
};

function asDetails(value: unknown): Details {
  return value && typeof value === 'object' && !Array.isArray(value) ? (value as Details) : {};
}

export function describeAuditEvent(event: AuditEventInput): string {
  const details = asDetails(event.details);
  const sentence = SENTENCES[event.action];
  if (sentence) return sentence(details);
  const target = event.targetId ? ` ${event.targetType} ${event.targetId}` : ` ${event.targetType}`;
  const extra = Object.keys(details).length > 0 ? ` ${JSON.stringify(details)}` : '';
  return `${event.action}${target}${extra}`;
}
