import type { Role } from '../../../../shared/roles';
import { formatMailTime, publicLink, renderMail, type RenderedMail } from './layout';

export interface InvitationMailData {
  inviterName: string;
  role: Role;
  token: string;
  expiresAt: Date;
}

export function invitationMail(data: InvitationMailData, publicUrl: string): RenderedMail {
  const article = /^[aeiou]/.test(data.role) ? 'an' : 'a';
  return renderMail({
    subject: `${data.inviterName} invited you to Kinefold`,
    greeting: 'Hello,',
    paragraphs: [
      `${data.inviterName} invited you to Kinefold as ${article} ${data.role}. Kinefold turns field footage ` +
        'into curated, paired views for training vision models.',
      `Open the link below, tell us your name and choose a password. The link works once and until ` +
        `${formatMailTime(data.expiresAt)}.`,
    ],
    action: { label: 'Set up your account', url: publicLink(publicUrl, `/invite/${data.token}`) },
    closing: 'If you did not expect this invitation, ignore this message; nothing happens until the link is used.',
  });
}
