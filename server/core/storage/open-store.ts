import { S3Client } from '@aws-sdk/client-s3';
import type { Config } from '../config';
import { createFolderStore } from './folder-store';
import { StoreNotUsable, type ObjectStore } from './object-store';
import { createS3Store, type S3Location } from './s3-store';

/** The store a configuration names: the bucket of KINEFOLD_OBJECT_STORE, or else the storage folder. */
export function createObjectStore(
  config: Pick<Config, 'storageDir' | 'objectStore' | 's3Endpoint' | 's3Region'>,
): ObjectStore {
  if (!config.objectStore) return createFolderStore(config.storageDir);
  const client = new S3Client({
    region: config.s3Region,
    ...(config.s3Endpoint ? { endpoint: config.s3Endpoint, forcePathStyle: true } : {}),
  });
  return createS3Store(client, parseObjectStoreUrl(config.objectStore), config.s3Endpoint);
}

/** `s3://bucket/some/prefix` → its bucket and key prefix; anything else is refused with the variable's name. */
export function parseObjectStoreUrl(value: string): S3Location {
  const match = /^s3:\/\/([a-z0-9][a-z0-9.-]{1,61}[a-z0-9])(?:\/(.*))?$/.exec(value);
  if (!match) {
    throw new StoreNotUsable(
      `KINEFOLD_OBJECT_STORE must look like s3://bucket or s3://bucket/prefix with a valid bucket name (got "${value}").`,
    );
  }
  return { bucket: match[1]!, prefix: (match[2] ?? '').replace(/^\/+|\/+$/g, '') };
}

/**
 * The configured store, once it answers. A store that cannot be reached, or a KINEFOLD_OBJECT_STORE that does not
 * parse, ends the process with one line naming the variable to fix rather than a stack trace.
 */
export async function openStoreOrExit(config: Config, processName: string): Promise<ObjectStore> {
  try {
    const store = createObjectStore(config);
    await store.ready();
    return store;
  } catch (error) {
    if (!(error instanceof StoreNotUsable)) throw error;
    console.error(`Kinefold ${processName} cannot start: ${(error as Error).message}`);
    process.exit(1);
  }
}
