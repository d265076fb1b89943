import path from 'node:path';
import { shardFileName } from '../../../shared/pairing/shard-name';
import type { SplitName } from '../../../shared/pairing/split';
import type { StoredView } from '../../../shared/pipeline-stages';

/**
 * Every path under the storage root, built from ids only (DESIGN §6): a name a person typed never becomes a path.
 * Server and worker both use this module, so moving to object storage later changes one place.
 */
export function storagePaths(root: string) {
  const clipDir = (clipId: number) => path.join(root, 'clips', String(clipId));
  return {
    root,
    incomingDir: path.join(root, 'incoming'),
    incomingFile: (uploadId: string) => path.join(root, 'incoming', `${uploadId}.part`),
    /** Resumable (tus) uploads: `<id>` holds the bytes received so far, `<id>.json` what the upload declared. */
    resumableDir: path.join(root, 'incoming', RESUMABLE_DIR),
    resumableFile: (uploadId: string) => path.join(root, 'incoming', RESUMABLE_DIR, uploadId),
    resumableInfo: (uploadId: string) => path.join(root, 'incoming', RESUMABLE_DIR, `${uploadId}.json`),
    pairsetsDir: path.join(root, 'pairsets'),
    /** The shards and pairset.json of a built pairset. */
    pairsetDir: (pairsetId: number) => path.join(root, 'pairsets', String(pairsetId)),
    pairsetManifest: (pairsetId: number) => path.join(root, 'pairsets', String(pairsetId), PAIRSET_MANIFEST),
    pairsetShard: (pairsetId: number, split: SplitName, index: number) =>
      path.join(root, 'pairsets', String(pairsetId), shardFileName(split, index)),
    /** Where a build writes before its folder is renamed to pairsetDir; `token` tells attempts apart. */
    pairsetWorkDir: (pairsetId: number, token: string) =>
      path.join(root, 'pairsets', `${pairsetWorkPrefix(pairsetId)}${token}`),
    clipsDir: path.join(root, 'clips'),
    clipDir,
    clipSource: (clipId: number, ext: string) => path.join(clipDir(clipId), `source.${ext}`),
    /** preview.mp4, frames/, thumbs/ and views/ of a clip. */
    clipDerived: (clipId: number) => derivedLayout(clipDir(clipId)),
    /** Where one attempt at a stage writes before renaming its outputs into place; `token` tells attempts apart. */
    clipWorkDir: (clipId: number, stage: string, token: string) =>
      path.join(clipDir(clipId), `${WORK_DIR_PREFIX}${stage}-${token}`),
  };
}
export type StoragePaths = ReturnType<typeof storagePaths>;

/** The folder of resumable uploads inside `incoming/`: they outlive a restart, unlike the other partial files. */
export const RESUMABLE_DIR = 'resumable';
/** Work folders start with this, so leftovers of a crashed attempt are found and removed by name. */
export const WORK_DIR_PREFIX = 'work-';
export const PAIRSET_MANIFEST = 'pairset.json';
/** Names of the work folders of one pairset's builds, for removing leftovers by name. */
export const pairsetWorkPrefix = (pairsetId: number) => `${WORK_DIR_PREFIX}${pairsetId}-`;
const FRAME_NAME_DIGITS = 6;

function frameName(index: number): string {
  return String(index).padStart(FRAME_NAME_DIGITS, '0');
}

/**
 * The derived files of a clip, laid out the same way under its folder and under a stage's work folder, so a
 * stage writes into the work folder and renames each output into the clip folder unchanged.
 */
export function derivedLayout(base: string) {
  const framesDir = path.join(base, 'frames');
  const thumbsDir = path.join(base, 'thumbs');
  const viewsDir = path.join(base, 'views');
  const motionDir = path.join(base, 'motion');
  return {
    preview: path.join(base, 'preview.mp4'),
    framesDir,
    frame: (index: number) => path.join(framesDir, `${frameName(index)}.png`),
    /** The same frame files as an ffmpeg image2 pattern, numbered from 0. */
    framePattern: path.join(framesDir, `%0${FRAME_NAME_DIGITS}d.png`),
    thumbsDir,
    thumbnail: path.join(thumbsDir, 'thumbnail.jpg'),
    viewsDir,
    viewDir: (view: StoredView) => path.join(viewsDir, view),
    view: (view: StoredView, index: number) => path.join(viewsDir, view, `${frameName(index)}.png`),
    motionDir,
    /** The forward field from frame `index` to `index` + 1 (Middlebury .flo), its colour picture, its backward. */
    motionFlo: (index: number) => path.join(motionDir, `${frameName(index)}.flo`),
    motionPicture: (index: number) => path.join(motionDir, `${frameName(index)}.png`),
    motionBackwardFlo: (index: number) => path.join(motionDir, `${frameName(index)}.back.flo`),
  };
}
export type DerivedLayout = ReturnType<typeof derivedLayout>;
