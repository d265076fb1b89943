/** A clip's life (DESIGN §2): a probed upload is queued, processed, reviewed, then accepted or rejected. */
export const CLIP_STATES = ['queued', 'processing', 'awaiting_review', 'accepted', 'rejected', 'failed'] as const;
export type ClipState = (typeof CLIP_STATES)[number];

/** States in which no verdict has been given yet: the uploader may still withdraw the clip or edit it. */
export const UNREVIEWED_STATES: readonly ClipState[] = ['queued', 'processing', 'awaiting_review', 'failed'];
