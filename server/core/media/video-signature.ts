import fs from 'node:fs';

/**
 * The first bytes of the video containers Kinefold takes, from each format's published layout: ISO BMFF
 * (MP4/MOV, ISO/IEC 14496-12: a box size then `ftyp`, `moov`, `mdat`, `free`, `wide` or `skip`), Matroska/WebM
 * (EBML magic 1A 45 DF A3), RIFF AVI, Ogg (`OggS`), FLV (`FLV`), MPEG-PS (pack start 00 00 01 BA), MPEG-TS
 * (sync byte 0x47 every 188 bytes).
 */
const SIGNATURES: ((head: Buffer) => boolean)[] = [
  (head) => /^(ftyp|moov|mdat|free|wide|skip)$/.test(head.toString('latin1', 4, 8)),
  (head) => head.readUInt32BE(0) === 0x1a45dfa3,
  (head) => head.toString('latin1', 0, 4) === 'RIFF' && head.toString('latin1', 8, 11) === 'AVI',
  (head) => head.toString('latin1', 0, 4) === 'OggS',
  (head) => head.toString('latin1', 0, 3) === 'FLV',
  (head) => head.readUInt32BE(0) === 0x000001ba,
  (head) => head[0] === 0x47 && head[188] === 0x47,
];

/**
 * True when the file starts like a video container. Used only to choose the words of a refusal: a file that
 * starts like a video but cannot be read is damaged or incomplete, anything else is not a video at all.
 */
export async function startsLikeVideo(file: string): Promise<boolean> {
  const handle = await fs.promises.open(file, 'r');
  try {
    const head = Buffer.alloc(189);
    const { bytesRead } = await handle.read(head, 0, head.length, 0);
    if (bytesRead < 12) return false;
    return SIGNATURES.some((matches) => matches(head));
  } finally {
    await handle.close();
  }
}
