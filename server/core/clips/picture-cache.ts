/**
 * Pictures made for a request (views, motion pictures), kept in memory so that a second curator, a reload or the
 * next clip's way back costs no decoding or PNG encoding. Bounded by bytes: when a new picture would pass the
 * bound, the least recently used ones leave first. A picture larger than the whole bound is made and not kept.
 * Each server process keeps its own; keys say what a picture is made of (made-picture.ts), so a clip processed
 * again never meets its old pictures, which simply age out.
 */

/** 32 MB: about 250 luma views or 80 motion pictures of 640 × 360 frames (docs/api.md, "Clip pictures"). */
export const DEFAULT_PICTURE_CACHE_BYTES = 32 * 1024 * 1024;

export interface PictureCacheStats {
  /** Pictures encoded since the process started (or since the bound was last set). */
  made: number;
  /** Answers served from memory. */
  kept: number;
  bytes: number;
  entries: number;
  maxBytes: number;
}

export class PictureCache {
  private readonly pictures = new Map<string, Buffer>();
  /** Pictures being made: a second request for the same one waits for the first making. */
  private readonly making = new Map<string, Promise<Buffer>>();
  private bytes = 0;
  private made = 0;
  private kept = 0;

  constructor(private readonly maxBytes: number) {}

  async get(key: string, make: () => Promise<Buffer>): Promise<Buffer> {
    const held = this.pictures.get(key);
    if (held) {
      // Map keeps insertion order: moving the key to the end makes the first key the least recently used.
      this.pictures.delete(key);
      this.pictures.set(key, held);
      this.kept += 1;
      return held;
    }
    const pending = this.making.get(key);
    if (pending) return pending;
    const making = make().then((bytes) => {
      this.made += 1;
      this.keep(key, bytes);
      return bytes;
    });
    this.making.set(key, making);
    try {
      return await making;
    } finally {
      this.making.delete(key);
    }
  }

  stats(): PictureCacheStats {
    const { made, kept, bytes, maxBytes } = this;
    return { made, kept, bytes, entries: this.pictures.size, maxBytes };
  }

  private keep(key: string, bytes: Buffer): void {
    if (bytes.length > this.maxBytes) return;
    for (const [oldKey, old] of this.pictures) {
      if (this.bytes + bytes.length <= this.maxBytes) break;
      this.pictures.delete(oldKey);
      this.bytes -= old.length;
    }
    this.pictures.set(key, bytes);
    this.bytes += bytes.length;
  }
}
