import type { PictureHeight } from '../../../shared/schemas/clip-media';

/** Heights the frame strip is drawn at: 34 pixels on the review screen (it must fit one screen), 54 elsewhere. */
export type StripHeight = 34 | 54;

const DOUBLED: Record<StripHeight, PictureHeight> = { 34: 68, 54: 108 };

/** The picture height a strip drawn `height` pixels high asks for on this screen: twice it on high-density ones. */
export function stripPictureHeightHere(height: StripHeight): PictureHeight {
  return window.devicePixelRatio > 1 ? DOUBLED[height] : height;
}
