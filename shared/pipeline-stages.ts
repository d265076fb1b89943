/** The stages of processing a clip, in order (DESIGN §5). */
export const CLIP_STAGES = ['sample', 'signals', 'motion', 'flags'] as const;
export type ClipStage = (typeof CLIP_STAGES)[number];

/** Views derived from each frame (DESIGN §7): luma as 8-bit grey, chroma as 16-bit RGB. */
export const FRAME_VIEWS = ['luma', 'chroma'] as const;
export type FrameView = (typeof FRAME_VIEWS)[number];
