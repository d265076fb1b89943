import { describe, expect, it } from 'vitest';
import { PictureCache } from '../../server/core/clips/picture-cache';

/** Least-recently-used eviction under a byte bound (common practice: the LRU policy of HTTP and page caches). */

const picture = (bytes: number) => () => Promise.resolve(Buffer.alloc(bytes));

describe('PictureCache', () => {
  it('makes a picture once and answers the kept copy after', async () => {
    const cache = new PictureCache(100);
    const first = await cache.get('a', picture(10));
    expect(await cache.get('a', picture(10))).toBe(first);
    expect(cache.stats()).toEqual({ made: 1, kept: 1, bytes: 10, entries: 1, maxBytes: 100 });
  });

  it('never holds more than its bound, the least recently used leaving first', async () => {
    const cache = new PictureCache(100);
    await cache.get('a', picture(40));
    await cache.get('b', picture(40));
    await cache.get('a', picture(40)); // a is now the more recently used
    await cache.get('c', picture(40)); // 120 > 100: b leaves
    expect(cache.stats()).toMatchObject({ made: 3, bytes: 80, entries: 2 });
    await cache.get('a', picture(40));
    await cache.get('b', picture(40));
    expect(cache.stats()).toMatchObject({ made: 4, kept: 2, bytes: 80, entries: 2 });
  });

  it('sends a picture larger than the bound without keeping it, and keeps nothing at 0 bytes', async () => {
    const cache = new PictureCache(100);
    await cache.get('small', picture(60));
    await cache.get('large', picture(101));
    expect(cache.stats()).toMatchObject({ bytes: 60, entries: 1 });
    const none = new PictureCache(0);
    await none.get('a', picture(1));
    await none.get('a', picture(1));
    expect(none.stats()).toMatchObject({ made: 2, kept: 0, bytes: 0, entries: 0 });
  });

  it('makes a picture asked twice at once only once, and forgets a failed making', async () => {
    const cache = new PictureCache(100);
    let made = 0;
    const make = async () => {
      made += 1;
      return Buffer.alloc(5);
    };
    const [a, b] = await Promise.all([cache.get('a', make), cache.get('a', make)]);
    expect(a).toBe(b);
    expect(made).toBe(1);
    await expect(cache.get('bad', () => Promise.reject(new Error('no frame')))).rejects.toThrow('no frame');
    expect(await cache.get('bad', picture(3))).toHaveLength(3);
  });
});
