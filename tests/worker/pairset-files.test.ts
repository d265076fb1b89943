import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { afterAll, describe, expect, it } from 'vitest';
import { UNKNOWN_FLOW } from '../../shared/motion/unknown-flow';
import { areaResizeFlow } from '../../worker/pairsets/resize-flow';
import { shardFileSink } from '../../worker/pairsets/shard-checksum';
import { openShard } from '../../worker/pairsets/shard-writer';
import { stableJson } from '../../worker/pairsets/stable-json';
import { readUstar } from '../helpers/ustar-reader';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-shard-files-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

let files = 0;
/** Writes the chunks through the shard file sink and answers its digest, checking the file holds the bytes. */
async function digestOf(chunks: Buffer[]) {
  const file = path.join(dir, `digest-${(files += 1)}.bin`);
  const expected = Buffer.concat(chunks);
  const sink = shardFileSink(file);
  await pipeline(Readable.from(chunks), sink.stream);
  const digest = await sink.done;
  expect(fs.readFileSync(file).equals(expected)).toBe(true);
  return digest;
}

describe('the shard checksum', () => {
  // FIPS 180-2 test vectors as CHECK-VALUES §8 lists them (Chromium vboot sha_test_vectors.h; catacomb
  // symm/t/sha256 for the empty string).
  it.each([
    ['abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
    ['', 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'],
    [
      'abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq',
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    ],
  ])('gives the published SHA-256 of %j', async (input, digest) => {
    expect(await digestOf(input ? [Buffer.from(input)] : [])).toEqual({ bytes: input.length, sha256: digest });
  });

  it('gives the published SHA-256 of a million "a" written in uneven chunks', async () => {
    const chunks = [Buffer.alloc(333_333, 'a'), Buffer.alloc(1, 'a'), Buffer.alloc(666_666, 'a')];
    expect(await digestOf(chunks)).toEqual({
      bytes: 1_000_000,
      sha256: 'cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0',
    });
  });
});

describe('the shard writer', () => {
  it('writes ustar members GNU tar lists with mode 0644, owner 0/0 and time 0, ending in two zero blocks', async () => {
    const file = path.join(dir, 'five.tar');
    const sink = openShard(file);
    await sink.add('index.json', Buffer.from('{"pairs":[]}'));
    await sink.add('pairs/000001-000002-frame~luma/a.png', Buffer.from('hello'));
    const digest = await sink.close();
    const bytes = fs.readFileSync(file);
    expect(digest.bytes).toBe(bytes.length);
    // Header, 5 bytes padded to a block, header and 12 bytes padded, then two zero blocks (CHECK-VALUES §10).
    expect(bytes.length).toBe(4 * 512 + 1024);
    const archive = readUstar(bytes);
    expect(archive.trailingZeroBytes).toBe(1024);
    expect(archive.members.map((member) => [member.name, member.size, member.data.toString()])).toEqual([
      ['index.json', 12, '{"pairs":[]}'],
      ['pairs/000001-000002-frame~luma/a.png', 5, 'hello'],
    ]);
    // Field offsets of git's tar.h: magic "ustar\0" at 257, version "00" at 263, numbers in octal ASCII.
    expect(bytes.subarray(257, 263).toString('latin1')).toBe('ustar\0');
    expect(bytes.subarray(263, 265).toString('latin1')).toBe('00');
    expect(bytes.subarray(100, 107).toString('latin1')).toBe('000644 ');
    const listing = execFileSync('tar', ['-tvf', file], { encoding: 'utf8' }).trim().split('\n');
    expect(listing).toEqual([
      expect.stringMatching(/^-rw-r--r-- 0\/0 +12 1970-01-01 00:00 index\.json$/),
      expect.stringMatching(/^-rw-r--r-- 0\/0 +5 1970-01-01 00:00 pairs\/000001-000002-frame~luma\/a\.png$/),
    ]);
  });

  it('gives the same bytes for the same members, and refuses to overwrite a shard', async () => {
    const write = async (name: string) => {
      const sink = openShard(path.join(dir, name));
      await sink.add('index.json', Buffer.from('{}'));
      await sink.add('pairs/x/b.flo', Buffer.alloc(700, 3));
      return sink.close();
    };
    const first = await write('same-1.tar');
    const second = await write('same-2.tar');
    expect(second).toEqual(first);
    const bytes = (name: string) => fs.readFileSync(path.join(dir, name));
    expect(bytes('same-1.tar').equals(bytes('same-2.tar'))).toBe(true);
    await expect(write('same-1.tar')).rejects.toThrow(/EEXIST/);
  });
});

describe('stable JSON', () => {
  it('sorts keys at every depth so key order never changes the bytes', () => {
    const a = stableJson({ b: 1, a: { d: [{ z: 1, y: 2 }], c: null } });
    const b = stableJson({ a: { c: null, d: [{ y: 2, z: 1 }] }, b: 1 });
    expect(a).toBe(b);
    expect(a).toBe('{"a":{"c":null,"d":[{"y":2,"z":1}]},"b":1}');
  });
});

describe('resizing a motion field', () => {
  it('halves a uniform field with the picture: (2, −1) px at 8 × 6 is (1, −0.5) px at 4 × 3', () => {
    const flow = new Float32Array(2 * 8 * 6);
    for (let p = 0; p < 48; p += 1) flow.set([2, -1], 2 * p);
    const out = areaResizeFlow(flow, 8, 6, 4, 3);
    expect(out.length).toBe(2 * 4 * 3);
    for (let p = 0; p < 12; p += 1) expect([out[2 * p], out[2 * p + 1]]).toEqual([1, -0.5]);
  });

  it('averages only known vectors and leaves an output pixel unknown when less than half of it is known', () => {
    // 4 × 2 → 2 × 1: the left output pixel covers u = 1, 3 and two unknowns (half known → kept, mean 2, × 0.5);
    // the right one covers three unknowns and one known (a quarter known → unknown).
    const u = [1, NaN, 9, UNKNOWN_FLOW, 3, UNKNOWN_FLOW, UNKNOWN_FLOW, UNKNOWN_FLOW];
    const flow = new Float32Array(u.flatMap((value) => [value, 0]));
    const out = areaResizeFlow(flow, 4, 2, 2, 1);
    expect(out[0]).toBe(1);
    expect(out[1]).toBe(0);
    expect([out[2], out[3]]).toEqual([UNKNOWN_FLOW, UNKNOWN_FLOW]);
  });
});
