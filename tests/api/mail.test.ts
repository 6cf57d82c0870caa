import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { sendMail } from '@/src/server/mail';
import { waitForMail } from '../support/mail';

describe('mail through nodemailer to the SMTP catcher', () => {
  it('delivers a message that the catcher parses with subject, body and headers intact', async () => {
    const marker = randomUUID();
    await sendMail({
      to: 'lead@tidewater.example',
      subject: `Varigate test ${marker}`,
      text: `plain body ${marker}`,
      html: `<p>html body ${marker}</p>`,
      headers: { 'X-Varigate-Test': marker },
    });
    const mail = await waitForMail((m) => m.subject.includes(marker));
    expect(mail.to).toContain('lead@tidewater.example');
    expect(mail.text).toContain(`plain body ${marker}`);
    expect(mail.html).toContain(`html body ${marker}`);
    expect(mail.headers['x-varigate-test']).toBe(marker);
  });
});
