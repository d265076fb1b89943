import { formatBytes } from '../../../../shared/format-bytes';
import { publicLink, renderMail, type RenderedMail } from './layout';

export interface QuotaThresholdMailData {
  name: string;
  /** "Project "Terraces"" or "Your account". */
  subjectLabel: string;
  percent: number;
  usedBytes: number;
  quotaBytes: number;
}

/** Sent once when a project or a user passes 80 % or 100 % of its quota, to admins and the operators concerned. */
export function quotaThresholdMail(data: QuotaThresholdMailData, publicUrl: string): RenderedMail {
  const full = data.percent >= 100;
  return renderMail({
    subject: `${data.subjectLabel} has used ${data.percent} % of its storage quota`,
    greeting: `Hello ${data.name},`,
    paragraphs: [
      `${data.subjectLabel} now uses ${formatBytes(data.usedBytes)} of its ${formatBytes(data.quotaBytes)} quota.`,
      full
        ? 'New uploads are refused until space is freed or the quota is raised; processing already under way finishes.'
        : 'Uploads still work; plan to free space or ask an admin to raise the quota before it fills.',
    ],
    action: { label: 'See storage use', url: publicLink(publicUrl, '/admin/usage') },
    closing: 'You get this message once per threshold crossed.',
  });
}
