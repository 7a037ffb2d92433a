import type { OutgoingMail } from '../mail/mail.service';

function escapeHtml(value: string): string {
  return value.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string,
  );
}

function mail(to: string, subject: string, paragraphs: string[], link: string): OutgoingMail {
  const text = [...paragraphs.slice(0, 1), link, ...paragraphs.slice(1)].join('\n\n');
  const html = [
    `<p>${escapeHtml(paragraphs[0])}</p>`,
    `<p><a href="${escapeHtml(link)}">${escapeHtml(link)}</a></p>`,
    ...paragraphs.slice(1).map((p) => `<p>${escapeHtml(p)}</p>`),
  ].join('\n');
  return { to, subject, text, html };
}

export function invitationMail(
  to: string,
  displayName: string,
  link: string,
  expiresAt: Date,
): OutgoingMail {
  return mail(
    to,
    'Your Kinpath account',
    [
      `Hello ${displayName}, an account has been opened for you in Kinpath. Choose your password here:`,
      `The link works once and until ${expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC (72 hours).`,
      'If you did not expect this message, ignore it: nothing happens without the link.',
    ],
    link,
  );
}

export function passwordResetMail(to: string, link: string): OutgoingMail {
  return mail(
    to,
    'Reset your Kinpath password',
    [
      'Someone asked to reset the password of your Kinpath account. Choose a new password here:',
      'The link works once and for one hour. Signing in with the new password ends your other sessions.',
      'If you did not ask for this, ignore this message: your password stays as it is.',
    ],
    link,
  );
}
