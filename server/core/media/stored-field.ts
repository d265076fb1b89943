import { decodeFlo } from '../../../shared/motion/formats/flo';
import { motionToColour } from '../../../shared/motion/colour-wheel';
import { rgbPng } from './frame-images';
import { decodePackedField, type PackedFieldContent } from './packed-field';

/**
 * Reads a clip's stored forward field whichever format holds it: a packed field (`.field`, with its consistency
 * plane) or, in clips not yet converted by the compact-storage job, a Middlebury `.flo` (no consistency stored).
 */
export function readStoredField(bytes: Uint8Array, name: string): PackedFieldContent {
  if (name.endsWith('.flo')) return { ...decodeFlo(bytes), consistent: null };
  return decodePackedField(bytes);
}

/**
 * The field in the flow colour wheel (Baker et al., IJCV 2011) as a PNG, `maxMotion` px at full colour: made when
 * asked, as it is a picture of the stored field and cheaper to make again than to keep.
 */
export function motionPicturePng({ flow, width, height }: PackedFieldContent, maxMotion: number): Promise<Buffer> {
  return rgbPng(motionToColour(flow, maxMotion).rgb, width, height);
}
