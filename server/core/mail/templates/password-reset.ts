import { formatMailTime, publicLink, renderMail, type RenderedMail } from './layout';

export interface PasswordResetMailData {
  name: string;
  token: string;
  expiresAt: Date;
  /** Who asked: the person on the sign-in page, or an admin on the people screen. */
  requestedBy: 'self' | 'admin';
}

export function passwordResetMail(data: PasswordResetMailData, publicUrl: string): RenderedMail {
  const why =
    data.requestedBy === 'admin'
      ? 'An admin asked Kinefold to send you a link for choosing a new password.'
      : 'Someone (hopefully you) asked to reset the password of your Kinefold account.';
  return renderMail({
    subject: 'Choose a new Kinefold password',
    greeting: `Hello ${data.name},`,
    paragraphs: [
      why,
      `The link below works once and until ${formatMailTime(data.expiresAt)}. Choosing a new password signs ` +
        'your account out everywhere else.',
    ],
    action: { label: 'Choose a new password', url: publicLink(publicUrl, `/reset-password/${data.token}`) },
    closing: 'If you did not ask for this, ignore this message; your password stays as it is.',
  });
}
