/** What every template produces: a subject and the same words as plain text and as HTML. */
export interface RenderedMail {
  subject: string;
  text: string;
  html: string;
}

/** One message's content: a greeting, a few paragraphs, one button-like link, and a closing note. */
export interface MailContent {
  subject: string;
  greeting: string;
  paragraphs: string[];
  action: { label: string; url: string };
  closing: string;
}

const HTML_ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (character) => HTML_ESCAPES[character]!);
}

/** An absolute link under the public base URL; keeps any path prefix the base has (e.g. behind a proxy). */
export function publicLink(publicUrl: string, path: string): string {
  return `${publicUrl.replace(/\/+$/, '')}${path}`;
}

const MAIL_TIME = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC' });

/** Mail readers are anywhere, so times in a message are spelled out in UTC. */
export function formatMailTime(at: Date): string {
  return `${MAIL_TIME.format(at)} UTC`;
}

/** Lays out the content twice: plain text for every reader, and simple inline-styled HTML. */
export function renderMail(content: MailContent): RenderedMail {
  const text = [
    content.greeting,
    ...content.paragraphs,
    `${content.action.label}: ${content.action.url}`,
    content.closing,
    '— Kinefold',
  ].join('\n\n');
  const url = escapeHtml(content.action.url);
  const paragraph = (words: string) => `<p style="margin:0 0 14px">${escapeHtml(words)}</p>`;
  const html = [
    '<!doctype html><html><body style="margin:0;padding:24px;background:#faf9f7;',
    "font-family:'Source Sans 3',Helvetica,Arial,sans-serif;color:#25211d;font-size:15px;line-height:1.5\">",
    '<div style="max-width:560px;margin:0 auto;background:#ffffff;border-top:4px solid #e0a54a;padding:24px">',
    '<p style="margin:0 0 18px;font-weight:700;color:#372b5f;letter-spacing:0.04em">KINEFOLD</p>',
    paragraph(content.greeting),
    ...content.paragraphs.map(paragraph),
    `<p style="margin:22px 0"><a href="${url}" style="background:#372b5f;color:#ffffff;padding:10px 18px;`,
    `border-radius:6px;text-decoration:none;font-weight:600">${escapeHtml(content.action.label)}</a></p>`,
    `<p style="margin:0 0 14px;font-size:13px;color:#675f53;word-break:break-all">Or open this address: ${url}</p>`,
    paragraph(content.closing),
    '</div></body></html>',
  ].join('');
  return { subject: content.subject, text, html };
}
