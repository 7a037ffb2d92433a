import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeToUtf8, inspectFile } from './file-inspection';

const dir = mkdtempSync(join(tmpdir(), 'kinpath-inspect-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let n = 0;
const file = (content: Buffer | string) => {
  const path = join(dir, `f-${++n}`);
  writeFileSync(path, content);
  return path;
};

describe('inspectFile', () => {
  it('finds empty, binary and text files', async () => {
    expect((await inspectFile(file(''))).empty).toBe(true);
    expect((await inspectFile(file('\ufeff\r\n  \n'))).empty).toBe(true);
    // The PNG signature (PNG specification, section 5.2): 89 50 4E 47 0D 0A 1A 0A.
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]);
    expect((await inspectFile(file(png))).binary).toBe('a PNG image');
    expect((await inspectFile(file('a,b\n1,2\n'))).binary).toBeNull();
  });

  it('names the encoding: UTF-8 strictly, Windows-1252 with C1 bytes, Latin-1 without, UTF-16 by BOM or NULs', async () => {
    expect((await inspectFile(file('title\nCafé\n'))).encoding).toBe('utf-8');
    // 0x93/0x94 are Windows-1252's curly quotes; 0xE9 is é in both single-byte encodings.
    expect(
      (await inspectFile(file(Buffer.from([0x74, 0x0a, 0x93, 0xe9, 0x94, 0x0a])))).encoding,
    ).toBe('windows-1252');
    expect(
      (await inspectFile(file(Buffer.from([0x74, 0x0a, 0x43, 0x61, 0x66, 0xe9, 0x0a])))).encoding,
    ).toBe('latin-1');
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('a,b\n1,2\n', 'utf16le')]);
    expect((await inspectFile(file(utf16))).encoding).toBe('utf-16le');
    expect((await inspectFile(file(Buffer.from('a,b\n1,2\n', 'utf16le')))).encoding).toBe(
      'utf-16le',
    );
  });
});

describe('decodeToUtf8', () => {
  it('decodes Windows-1252 and UTF-16 into UTF-8, written for the server only', async () => {
    const out = join(dir, 'out-1');
    const r = await decodeToUtf8(
      file(Buffer.from([0x74, 0x0a, 0x93, 0xe9, 0x94, 0x0a])),
      out,
      'windows-1252',
    );
    expect(r.undefinedAtLine).toBeNull();
    expect(readFileSync(out, 'utf8')).toBe('t\n\u201cé\u201d\n');
    expect(statSync(out).mode & 0o777).toBe(0o600);
    const out2 = join(dir, 'out-2');
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('a,b\nÅ,2\n', 'utf16le')]);
    await decodeToUtf8(file(utf16), out2, 'utf-16le');
    expect(readFileSync(out2, 'utf8')).toBe('a,b\nÅ,2\n');
  });

  it('names the line of a byte the encoding does not define instead of replacing it', async () => {
    // 0x81 is undefined in Windows-1252 (the code page's published table leaves it empty).
    const r = await decodeToUtf8(
      file(Buffer.from('a\nb\nc\x81\n', 'latin1')),
      join(dir, 'o3'),
      'windows-1252',
    );
    expect(r.undefinedAtLine).toBe(3);
  });
});
