import type { UsageByKind, UsageKind } from '../../../shared/types/admin';
import type { ObjectStore, StoredObject } from './object-store';
import { objectKeys } from './paths';

export interface StoredUsage {
  byKind: UsageByKind;
  total: number;
}

export function emptyUsage(): UsageByKind {
  return { source: 0, preview: 0, frames: 0, motion: 0, views: 0, pairsets: 0 };
}

/**
 * Which usage kind a clip's object belongs to, by the first part of its key under the clip (DESIGN §6 layout).
 * Stage work folders and partial writes are nobody's data yet and are not counted.
 */
function kindOfEntry(entry: string, key: string): UsageKind | null {
  if (key.endsWith('.partial')) return null;
  if (entry.startsWith('source.')) return 'source';
  if (entry === 'preview.mp4' || entry === 'thumbs') return 'preview';
  if (entry === 'frames' || entry === 'motion' || entry === 'views') return entry;
  return null;
}

function usageOf(objects: Iterable<StoredObject>, under: string): StoredUsage {
  const byKind = emptyUsage();
  for (const object of objects) {
    const kind = kindOfEntry(object.key.slice(under.length + 1).split('/')[0]!, object.key);
    if (kind) byKind[kind] += object.size;
  }
  return { byKind, total: Object.values(byKind).reduce((sum, bytes) => sum + bytes, 0) };
}

/** One clip's stored bytes by kind, the same figure whether the store is the storage folder or a bucket. */
export async function clipStoredUsage(store: ObjectStore, clipId: number): Promise<StoredUsage> {
  const under = objectKeys.clipDir(clipId);
  return usageOf(await store.list(under), under);
}

/** A folder under `clips/`: its bytes and when its newest object was written. */
export interface StoredFolder extends StoredUsage {
  newestMs: number;
}

/**
 * Every clip's stored bytes from one listing of `clips/`, and the other entries there (a folder a crash left half
 * removed) by the name of their first part, each with the time of its newest object.
 */
export async function storedUsageByClip(
  store: ObjectStore,
): Promise<{ clips: Map<number, StoredFolder>; others: Map<string, StoredFolder> }> {
  const groups = new Map<string, StoredObject[]>();
  for (const object of await store.list(objectKeys.clipsDir)) {
    const entry = object.key.slice(objectKeys.clipsDir.length + 1).split('/')[0]!;
    const group = groups.get(entry) ?? [];
    group.push(object);
    groups.set(entry, group);
  }
  const clips = new Map<number, StoredFolder>();
  const others = new Map<string, StoredFolder>();
  for (const [entry, objects] of groups) {
    const newestMs = Math.max(...objects.map((object) => object.modified.getTime()));
    if (/^\d+$/.test(entry)) {
      clips.set(Number(entry), { ...usageOf(objects, objectKeys.clipDir(Number(entry))), newestMs });
    } else {
      const total = objects.reduce((sum, object) => sum + object.size, 0);
      others.set(entry, { byKind: emptyUsage(), total, newestMs });
    }
  }
  return { clips, others };
}
