import { publicLink, renderMail, type RenderedMail } from './layout';

export interface ClipFailedMailData {
  name: string;
  clipId: number;
  originalName: string;
  /** The processing stage that failed, e.g. `sample`. */
  stage: string;
  /** Why, in words the uploader can act on. */
  message: string;
}

/** Sent once to the uploader when processing of their clip fails for good. */
export function clipFailedMail(data: ClipFailedMailData, publicUrl: string): RenderedMail {
  return renderMail({
    subject: `Kinefold could not process ${data.originalName}`,
    greeting: `Hello ${data.name},`,
    paragraphs: [
      `Processing of your clip "${data.originalName}" (clip ${data.clipId}) stopped in the ${data.stage} stage.`,
      data.message,
    ],
    action: { label: 'Open the clip', url: publicLink(publicUrl, `/clips/${data.clipId}`) },
    closing: 'An admin can process the clip again once the cause is fixed; a damaged file needs a fresh upload.',
  });
}
