/**
 * Reads what the fake SMTP server receives: the subject, the Message-ID and the first plain-text and HTML
 * bodies of a MIME message (RFC 2045–2047), which is all the mail log shows. No MIME parser ships with
 * Kinefold's dependencies, and the messages come from our own sender through nodemailer, so this small
 * reader covers multipart nesting, base64, quoted-printable, charsets and encoded header words.
 */
export interface ReadMessage {
  messageId: string | null;
  subject: string;
  text: string;
  html: string;
}

interface Part {
  headers: Map<string, string>;
  body: Buffer;
}

export function readMessage(raw: Buffer): ReadMessage {
  const root = splitPart(raw);
  const bodies: { text?: string; html?: string } = {};
  collectBodies(root, bodies);
  return {
    messageId: root.headers.get('message-id')?.trim() || null,
    subject: decodeWords(root.headers.get('subject') ?? '').trim(),
    text: bodies.text ?? '',
    html: bodies.html ?? '',
  };
}

function splitPart(raw: Buffer): Part {
  const crlf = raw.indexOf('\r\n\r\n');
  const lf = raw.indexOf('\n\n');
  const [end, gap] = crlf >= 0 && (lf < 0 || crlf < lf) ? [crlf, 4] : lf >= 0 ? [lf, 2] : [raw.length, 0];
  const headers = new Map<string, string>();
  // Folded header lines continue the previous one (RFC 5322 §2.2.3).
  const unfolded = raw
    .subarray(0, end)
    .toString('utf8')
    .replace(/\r?\n(?=[ \t])/g, '');
  for (const line of unfolded.split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon <= 0) continue;
    const name = line.slice(0, colon).trim().toLowerCase();
    if (!headers.has(name)) headers.set(name, line.slice(colon + 1).trim());
  }
  return { headers, body: raw.subarray(Math.min(end + gap, raw.length)) };
}

function headerValue(value: string | undefined): { value: string; params: Record<string, string> } {
  const [main = '', ...rest] = (value ?? '').split(/;(?=(?:[^"]*"[^"]*")*[^"]*$)/);
  const params: Record<string, string> = {};
  for (const param of rest) {
    const equals = param.indexOf('=');
    if (equals < 0) continue;
    params[param.slice(0, equals).trim().toLowerCase()] = param
      .slice(equals + 1)
      .trim()
      .replace(/^"(.*)"$/, '$1');
  }
  return { value: main.trim().toLowerCase(), params };
}

function collectBodies(part: Part, bodies: { text?: string; html?: string }): void {
  const type = headerValue(part.headers.get('content-type') ?? 'text/plain');
  if (type.value.startsWith('multipart/') && type.params.boundary) {
    for (const child of splitMultipart(part.body, type.params.boundary)) collectBodies(splitPart(child), bodies);
    return;
  }
  if (headerValue(part.headers.get('content-disposition')).value === 'attachment') return;
  if (type.value === 'text/plain' && bodies.text === undefined) bodies.text = decodeBody(part, type.params.charset);
  if (type.value === 'text/html' && bodies.html === undefined) bodies.html = decodeBody(part, type.params.charset);
}

/** Splits at the boundary lines; latin1 keeps every byte as one character, so nothing is re-encoded. */
function splitMultipart(body: Buffer, boundary: string): Buffer[] {
  const parts: string[][] = [];
  let current: string[] | null = null;
  for (const line of body.toString('latin1').split(/\r?\n/)) {
    const trimmed = line.trimEnd();
    if (trimmed === `--${boundary}--`) break;
    if (trimmed === `--${boundary}`) {
      current = [];
      parts.push(current);
    } else {
      current?.push(line);
    }
  }
  return parts.map((lines) => Buffer.from(lines.join('\r\n'), 'latin1'));
}

function decodeBody(part: Part, charset = 'utf-8'): string {
  const encoding = (part.headers.get('content-transfer-encoding') ?? '7bit').trim().toLowerCase();
  const latin1 = part.body.toString('latin1');
  const bytes =
    encoding === 'base64'
      ? Buffer.from(latin1.replace(/\s+/g, ''), 'base64')
      : encoding === 'quoted-printable'
        ? decodeQuotedPrintable(latin1)
        : part.body;
  return decodeCharset(bytes, charset).replace(/\r\n/g, '\n');
}

function decodeQuotedPrintable(value: string): Buffer {
  const unwrapped = value.replace(/=\r?\n/g, '');
  const bytes: number[] = [];
  for (let i = 0; i < unwrapped.length; i += 1) {
    const hex = unwrapped.slice(i + 1, i + 3);
    if (unwrapped[i] === '=' && /^[0-9A-Fa-f]{2}$/.test(hex)) {
      bytes.push(parseInt(hex, 16));
      i += 2;
    } else {
      bytes.push(unwrapped.charCodeAt(i) & 0xff);
    }
  }
  return Buffer.from(bytes);
}

function decodeCharset(bytes: Buffer, charset: string): string {
  try {
    return new TextDecoder(charset).decode(bytes);
  } catch {
    return bytes.toString('utf8');
  }
}

const ENCODED_WORD = /=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g;

/** Decodes RFC 2047 encoded words in a header value, leaving the plain text around them as it is. */
function decodeWords(value: string): string {
  const joined = value.replace(/(\?=)\s+(?==\?)/g, '$1');
  const pieces: { charset: string | null; bytes: Buffer }[] = [];
  let last = 0;
  for (const match of joined.matchAll(ENCODED_WORD)) {
    const [word, charset = 'utf-8', kind = 'B', encoded = ''] = match;
    if (match.index > last) pieces.push({ charset: null, bytes: Buffer.from(joined.slice(last, match.index)) });
    const bytes =
      kind.toUpperCase() === 'B' ? Buffer.from(encoded, 'base64') : decodeQuotedPrintable(encoded.replace(/_/g, ' '));
    const previous = pieces.at(-1);
    // One character may be split across neighbouring words, so their bytes are decoded together.
    if (previous?.charset?.toLowerCase() === charset.toLowerCase()) {
      previous.bytes = Buffer.concat([previous.bytes, bytes]);
    } else {
      pieces.push({ charset, bytes });
    }
    last = match.index + word.length;
  }
  if (last < joined.length) pieces.push({ charset: null, bytes: Buffer.from(joined.slice(last)) });
  return pieces
    .map((piece) => (piece.charset ? decodeCharset(piece.bytes, piece.charset) : piece.bytes.toString('utf8')))
    .join('');
}
