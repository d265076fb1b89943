/** The stages of processing a clip, in order (DESIGN §5). */
export const CLIP_STAGES = ['sample', 'signals', 'motion', 'views', 'flags'] as const;
export type ClipStage = (typeof CLIP_STAGES)[number];

/** Views stored per frame by the views stage (DESIGN §7): luma as 8-bit grey, chroma as 16-bit RGB. */
export const STORED_VIEWS = ['luma', 'chroma'] as const;
export type StoredView = (typeof STORED_VIEWS)[number];
