import path from 'node:path';
import { shardFileName } from '../../../shared/pairing/shard-name';
import type { SplitName } from '../../../shared/pairing/split';

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
    /** preview.mp4, frames/, thumbs/ and motion/ of a clip, with file names of the clip's derived format. */
    clipDerived: (clipId: number, format: DerivedFormat = 'packed') => derivedLayout(clipDir(clipId), format),
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

/**
 * How a clip's derived files are stored. `packed` (every clip processed since): frames as lossless WebP, forward
 * motion fields as packed fields (media/packed-field.ts), no stored views, backward fields or motion pictures.
 * `original`: frames as PNG, fields as Middlebury .flo both ways, views and pictures on disk; the compact-storage
 * job converts such clips and readers take both meanwhile.
 */
export const DERIVED_FORMATS = ['original', 'packed'] as const;
export type DerivedFormat = (typeof DERIVED_FORMATS)[number];

export function frameName(index: number): string {
  return String(index).padStart(FRAME_NAME_DIGITS, '0');
}

/**
 * The derived files of a clip, laid out the same way under its folder and under a stage's work folder, so a
 * stage writes into the work folder and renames each output into the clip folder unchanged.
 */
export function derivedLayout(base: string, format: DerivedFormat = 'packed') {
  const framesDir = path.join(base, 'frames');
  const thumbsDir = path.join(base, 'thumbs');
  const motionDir = path.join(base, 'motion');
  const frameExt = format === 'packed' ? 'webp' : 'png';
  const fieldExt = format === 'packed' ? 'field' : 'flo';
  return {
    format,
    preview: path.join(base, 'preview.mp4'),
    framesDir,
    frame: (index: number) => path.join(framesDir, `${frameName(index)}.${frameExt}`),
    /** The same frame files as an ffmpeg image2 pattern, numbered from 0. */
    framePattern: path.join(framesDir, `%0${FRAME_NAME_DIGITS}d.${frameExt}`),
    thumbsDir,
    thumbnail: path.join(thumbsDir, 'thumbnail.jpg'),
    motionDir,
    /** The forward field from frame `index` to `index` + 1: a packed field, or a Middlebury .flo. */
    motionField: (index: number) => path.join(motionDir, `${frameName(index)}.${fieldExt}`),
  };
}
export type DerivedLayout = ReturnType<typeof derivedLayout>;

/**
 * The same layout as keys of the object store (object-store.ts): relative to its root, `/`-separated. Server and
 * worker name stored objects only through these; `storagePaths` remains for the local folders (incoming uploads,
 * the database, a worker's scratch).
 */
export const objectKeys: StoragePaths = storagePaths('');
