/**
 * An independent POSIX ustar reader for tests, written from the header layout alone (CHECK-VALUES §10: git's
 * `tar.h` offsets; numbers in octal ASCII; the checksum is the byte sum of the header with the chksum field
 * counted as eight spaces, as SerenityOS `Tar.cpp` computes it). It shares no code with the writer.
 */

export const BLOCK = 512;

export interface UstarMember {
  name: string;
  mode: number;
  uid: number;
  gid: number;
  size: number;
  mtime: number;
  typeflag: string;
  magic: string;
  version: string;
  uname: string;
  gname: string;
  /** Offset of the member's header in the archive. */
  offset: number;
  data: Buffer;
}

export interface UstarArchive {
  members: UstarMember[];
  /** Zero bytes after the last member's data. */
  trailingZeroBytes: number;
}

const text = (header: Buffer, offset: number, length: number) => {
  const field = header.subarray(offset, offset + length);
  const end = field.indexOf(0);
  return field.subarray(0, end === -1 ? length : end).toString('latin1');
};
const octal = (header: Buffer, offset: number, length: number) =>
  parseInt(text(header, offset, length).trim() || '0', 8);

export function readUstar(archive: Buffer): UstarArchive {
  if (archive.length % BLOCK !== 0) throw new Error(`archive of ${archive.length} bytes is not whole 512-byte blocks`);
  const members: UstarMember[] = [];
  let offset = 0;
  while (offset + BLOCK <= archive.length) {
    const header = archive.subarray(offset, offset + BLOCK);
    if (header.every((byte) => byte === 0)) break;
    let sum = 0;
    for (let i = 0; i < BLOCK; i += 1) sum += i >= 148 && i < 156 ? 0x20 : header[i]!;
    const stored = octal(header, 148, 8);
    if (sum !== stored) throw new Error(`header at ${offset}: checksum ${stored} but the bytes sum to ${sum}`);
    const prefix = text(header, 345, 155);
    const name = text(header, 0, 100);
    const size = octal(header, 124, 12);
    members.push({
      name: prefix ? `${prefix}/${name}` : name,
      mode: octal(header, 100, 8),
      uid: octal(header, 108, 8),
      gid: octal(header, 116, 8),
      size,
      mtime: octal(header, 136, 12),
      typeflag: text(header, 156, 1),
      magic: text(header, 257, 6),
      version: archive.subarray(offset + 263, offset + 265).toString('latin1'),
      uname: text(header, 265, 32),
      gname: text(header, 297, 32),
      offset,
      data: archive.subarray(offset + BLOCK, offset + BLOCK + size),
    });
    offset += BLOCK + Math.ceil(size / BLOCK) * BLOCK;
  }
  const rest = archive.subarray(offset);
  if (!rest.every((byte) => byte === 0)) throw new Error(`non-zero bytes after the end-of-archive marker at ${offset}`);
  return { members, trailingZeroBytes: rest.length };
}
