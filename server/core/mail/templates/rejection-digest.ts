import { publicLink, renderMail, type RenderedMail } from './layout';

export interface RejectedClipLine {
  clipId: number;
  originalName: string;
  /** The reason's words as the curator picked them. */
  reason: string;
  comment: string;
}

export interface RejectionDigestMailData {
  name: string;
  clips: RejectedClipLine[];
}

/** A digest lists this many clips by name; the rest are counted, and the clip library shows them all. */
export const DIGEST_LISTED_CLIPS = 40;

/** At most once an hour to an uploader: their clips rejected since the last digest, with reasons and comments. */
export function rejectionDigestMail(data: RejectionDigestMailData, publicUrl: string): RenderedMail {
  const count = data.clips.length;
  const listed = data.clips
    .slice(0, DIGEST_LISTED_CLIPS)
    .map(
      (clip) =>
        `"${clip.originalName}" (clip ${clip.clipId}): ${clip.reason}${clip.comment ? `. Comment: ${clip.comment}` : ''}`,
    );
  const more = count > DIGEST_LISTED_CLIPS ? [`… and ${count - DIGEST_LISTED_CLIPS} more.`] : [];
  return renderMail({
    subject: count === 1 ? 'Kinefold: a clip of yours was rejected' : `Kinefold: ${count} clips of yours were rejected`,
    greeting: `Hello ${data.name},`,
    paragraphs: [
      count === 1
        ? 'A curator rejected one of your clips, so it will not become training data:'
        : `Curators rejected ${count} of your clips, so they will not become training data:`,
      ...listed,
      ...more,
    ],
    action: { label: 'See your rejected clips', url: publicLink(publicUrl, '/clips?state=rejected') },
    closing:
      'Kinefold sends at most one of these messages an hour. If a reason looks wrong, ask the curator: a ' +
      'verdict can be changed for a day, and by an admin later.',
  });
}
