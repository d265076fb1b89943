import { clipFailedMail, type ClipFailedMailData } from './clip-failed';
import { invitationMail, type InvitationMailData } from './invitation';
import type { RenderedMail } from './layout';
import { passwordResetMail, type PasswordResetMailData } from './password-reset';
import { quotaThresholdMail, type QuotaThresholdMailData } from './quota-threshold';
import { rejectionDigestMail, type RejectionDigestMailData } from './rejection-digest';

/** Every kind of message Kinefold sends, with the data each one needs. */
export interface MailTemplateData {
  invitation: InvitationMailData;
  'password-reset': PasswordResetMailData;
  'clip-failed': ClipFailedMailData;
  'quota-threshold': QuotaThresholdMailData;
  'rejection-digest': RejectionDigestMailData;
}
export type MailTemplate = keyof MailTemplateData;

type Renderers = { [T in MailTemplate]: (data: MailTemplateData[T], publicUrl: string) => RenderedMail };

/** Typed by MailTemplateData, so a template without a renderer fails to compile. */
const RENDERERS: Renderers = {
  invitation: invitationMail,
  'password-reset': passwordResetMail,
  'clip-failed': clipFailedMail,
  'quota-threshold': quotaThresholdMail,
  'rejection-digest': rejectionDigestMail,
};

export function renderTemplate<T extends MailTemplate>(
  template: T,
  data: MailTemplateData[T],
  publicUrl: string,
): RenderedMail {
  return RENDERERS[template](data, publicUrl);
}

export type { RenderedMail } from './layout';
