import 'server-only';
import { env } from '../env';
import { logger } from '../logger';
import { insertDelivery, markDeliveryFailed, markDeliverySent } from '../queries/mail-deliveries';
import { sendMail } from '../mail';

/**
 * Mails about accounts: sign-in links, password resets, invitations. Sent at once (a person is
 * waiting for them) and logged in mail_deliveries like every other mail.
 */

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function layout(
  title: string,
  paragraphs: string[],
  action: { label: string; url: string },
): { text: string; html: string } {
  const text = [title, '', ...paragraphs, '', `${action.label}: ${action.url}`, '', '— Varigate'].join('\n');
  const html = `<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#0f172a;max-width:560px">
<h1 style="font-size:18px">${escapeHtml(title)}</h1>
${paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join('\n')}
<p><a href="${escapeHtml(action.url)}" style="display:inline-block;background:#0f172a;color:#fff;padding:8px 14px;border-radius:6px;text-decoration:none">${escapeHtml(action.label)}</a></p>
<p style="color:#64748b;font-size:12px">Or paste this address into your browser: ${escapeHtml(action.url)}</p>
</body></html>`;
  return { text, html };
}

async function deliver(
  kind: 'sign-in' | 'reset' | 'invitation',
  to: string,
  subject: string,
  body: { text: string; html: string },
  workspaceId?: string,
): Promise<void> {
  const id = await insertDelivery({ workspaceId, kind, recipient: to, subject });
  try {
    const { messageId } = await sendMail({ to, subject, ...body });
    if (id) await markDeliverySent({ id, messageId });
  } catch (err) {
    logger.error({ err, kind }, 'could not send account mail');
    if (id) await markDeliveryFailed({ id, error: (err as Error).message, attempts: 1 });
    throw err;
  }
}

export async function sendSignInLink(to: string, secret: string): Promise<void> {
  const url = `${env().APP_URL}/sign-in/link?token=${encodeURIComponent(secret)}`;
  await deliver(
    'sign-in',
    to,
    'Your Varigate sign-in link',
    layout(
      'Sign in to Varigate',
      ['Use this link within 15 minutes; it works once.', 'If you did not ask for it, ignore this mail.'],
      { label: 'Sign in', url },
    ),
  );
}

export async function sendPasswordReset(to: string, secret: string): Promise<void> {
  const url = `${env().APP_URL}/reset/confirm?token=${encodeURIComponent(secret)}`;
  await deliver(
    'reset',
    to,
    'Reset your Varigate password',
    layout(
      'Choose a new password',
      [
        'Use this link within one hour; it works once.',
        'If you did not ask for it, ignore this mail: your password stays as it is.',
      ],
      { label: 'Choose a new password', url },
    ),
  );
}

export async function sendInvitation(input: {
  to: string;
  secret: string;
  workspaceId: string;
  workspaceName: string;
  role: string;
  invitedBy: string;
}): Promise<void> {
  const url = `${env().APP_URL}/invite/${encodeURIComponent(input.secret)}`;
  await deliver(
    'invitation',
    input.to,
    `You are invited to ${input.workspaceName} on Varigate`,
    layout(
      `Join ${input.workspaceName}`,
      [
        `${input.invitedBy} invited you to the workspace ${input.workspaceName} as ${input.role}.`,
        'The invitation works once and expires in 7 days.',
      ],
      { label: 'Accept the invitation', url },
    ),
    input.workspaceId,
  );
}
