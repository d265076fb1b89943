/**
 * `npm run migrate:scale-out`, the store half: copies the storage folder's clips and pairsets into the bucket of
 * KINEFOLD_OBJECT_STORE. Run it again after an interruption: what is already there is skipped.
 */
import { formatBytes } from '../../shared/format-bytes';
import { loadConfig } from '../core/config';
import { copyIntoStore } from '../core/storage/copy-to-store';
import { createFolderStore } from '../core/storage/folder-store';
import { openStoreOrExit } from '../core/storage/open-store';

/** A progress line every this many objects. */
const REPORT_EVERY = 500;

const config = loadConfig();
if (!config.objectStore) {
  console.error('Kinefold migration: KINEFOLD_OBJECT_STORE is not set, so there is no store to copy the folder into.');
  process.exit(1);
}
const target = await openStoreOrExit(config, 'migration');
const source = createFolderStore(config.storageDir);
console.log(`Kinefold migration: copying ${source.location} into ${target.location}.`);
const tally = await copyIntoStore(source, target, (key, sofar) => {
  if (sofar.copied % REPORT_EVERY === 0) console.log(`  ${sofar.copied} objects copied (last ${key})`);
});
console.log(
  `Kinefold migration: ${tally.copied} objects copied (${formatBytes(tally.copiedBytes)}), ` +
    `${tally.skipped} already in the store.`,
);
