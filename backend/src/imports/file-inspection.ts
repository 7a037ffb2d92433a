import { createHash } from 'node:crypto';
import { createReadStream, createWriteStream } from 'node:fs';
import { once } from 'node:events';
import iconv from 'iconv-lite';

/** Encodings a registrar may confirm for a file that is not UTF-8 (data.md). */
export const FILE_ENCODINGS = ['utf-8', 'windows-1252', 'latin-1', 'utf-16le', 'utf-16be'] as const;
export type FileEncoding = (typeof FILE_ENCODINGS)[number];

export const ENCODING_NAMES: Record<FileEncoding, string> = {
  'utf-8': 'UTF-8',
  'windows-1252': 'Windows-1252 (Western European)',
  'latin-1': 'Latin-1 (ISO-8859-1)',
  'utf-16le': 'UTF-16 (little-endian)',
  'utf-16be': 'UTF-16 (big-endian)',
};

export interface FileInspection {
  /** SHA-256 of the bytes as uploaded (only ever stored keyed, see the service). */
  sha256: string;
  bytes: number;
  /** Nothing but blanks, line breaks or a byte-order mark. */
  empty: boolean;
  /** What a binary file looks like ('a PNG image'), or null for text. */
  binary: string | null;
  /** The encoding the bytes read as. */
  encoding: FileEncoding;
}

const MAGIC: [number[], string][] = [
  [[0x89, 0x50, 0x4e, 0x47], 'a PNG image'],
  [[0xff, 0xd8, 0xff], 'a JPEG image'],
  [[0x47, 0x49, 0x46, 0x38], 'a GIF image'],
  [[0x25, 0x50, 0x44, 0x46], 'a PDF document'],
  [[0x50, 0x4b, 0x03, 0x04], 'a ZIP archive or an Excel workbook (.xlsx); save it as CSV'],
  [[0xd0, 0xcf, 0x11, 0xe0], 'an old Excel or Word file (.xls, .doc); save it as CSV'],
  [[0x1f, 0x8b], 'a gzip archive'],
];

/**
 * One pass over the upload: its digest, whether it is empty or binary, and which
 * encoding its bytes read as. UTF-8 is checked strictly, so no character is ever
 * replaced on the way in.
 */
export async function inspectFile(path: string): Promise<FileInspection> {
  const hash = createHash('sha256');
  const utf8 = new TextDecoder('utf-8', { fatal: true });
  let utf8Ok = true;
  let bytes = 0;
  let head: Buffer | null = null;
  let nulsEven = 0;
  let nulsOdd = 0;
  let c1Controls = 0;
  let visible = false;
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) {
    const buf = chunk as Buffer;
    hash.update(buf);
    if (head === null) head = buf.subarray(0, 8);
    if (utf8Ok) {
      try {
        utf8.decode(buf, { stream: true });
      } catch {
        utf8Ok = false;
      }
    }
    for (let i = 0; i < buf.length; i++) {
      const b = buf[i];
      if (b === 0) {
        if ((bytes + i) % 2 === 0) nulsEven++;
        else nulsOdd++;
      } else if (b >= 0x80 && b <= 0x9f) c1Controls++;
      if (
        !visible &&
        b > 0x20 &&
        b !== 0xef &&
        b !== 0xbb &&
        b !== 0xbf &&
        b !== 0xff &&
        b !== 0xfe
      ) {
        visible = true;
      }
    }
    bytes += buf.length;
  }
  if (utf8Ok) {
    try {
      utf8.decode();
    } catch {
      utf8Ok = false;
    }
  }
  const first = head ?? Buffer.alloc(0);
  // A stray NUL in a text file is refused at validation with its line; many make it binary.
  const nuls = nulsEven + nulsOdd;
  const starts = (sig: number[]) => sig.every((b, i) => first[i] === b);
  let encoding: FileEncoding = 'utf-8';
  let binary: string | null = null;
  const magic = MAGIC.find(([sig]) => starts(sig));
  if (starts([0xff, 0xfe])) encoding = 'utf-16le';
  else if (starts([0xfe, 0xff])) encoding = 'utf-16be';
  else if (magic) binary = magic[1];
  else if (nuls > bytes / 20 && nulsOdd > 4 * nulsEven) encoding = 'utf-16le';
  else if (nuls > bytes / 20 && nulsEven > 4 * nulsOdd) encoding = 'utf-16be';
  else if (nuls > bytes / 20) binary = 'a binary file, not text';
  else if (!utf8Ok) encoding = c1Controls > 0 ? 'windows-1252' : 'latin-1';
  return { sha256: hash.digest('hex'), bytes, empty: !visible, binary, encoding };
}

const ICONV_NAMES: Record<FileEncoding, string> = {
  'utf-8': 'utf8',
  'windows-1252': 'win1252',
  'latin-1': 'latin1',
  'utf-16le': 'utf16le',
  'utf-16be': 'utf16be',
};

/**
 * Rewrites a file of the confirmed encoding as UTF-8 (mode 0600). A byte the
 * encoding does not define is not replaced: the answer names its line instead.
 */
export async function decodeToUtf8(
  from: string,
  to: string,
  encoding: FileEncoding,
): Promise<{ undefinedAtLine: number | null }> {
  const decoder = iconv.getDecoder(ICONV_NAMES[encoding], { stripBOM: true });
  const out = createWriteStream(to, { mode: 0o600 });
  const closed = once(out, 'close');
  let line = 1;
  let undefinedAtLine: number | null = null;
  const write = async (text: string) => {
    if (undefinedAtLine === null) {
      const bad = text.indexOf('\ufffd');
      if (bad >= 0) undefinedAtLine = line + (text.slice(0, bad).match(/\n/g)?.length ?? 0);
      else line += text.match(/\n/g)?.length ?? 0;
    }
    if (text && !out.write(text, 'utf8')) await once(out, 'drain');
  };
  try {
    for await (const chunk of createReadStream(from, { highWaterMark: 1 << 20 })) {
      await write(decoder.write(chunk as Buffer));
    }
    await write(decoder.end() ?? '');
  } finally {
    out.end();
    await closed;
  }
  return { undefinedAtLine };
}
