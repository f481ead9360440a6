// Telling file types apart by their first bytes, before any parser sees them. Pure.
//   zip: "PK\x03\x04" — local file header signature (APPNOTE.TXT, PKWARE ZIP File Format
//        Specification 6.3.10, §4.3.7); .xlsx files are zip packages (ECMA-376 Part 2, OPC).
//   OLE: D0 CF 11 E0 A1 B1 1A E1 — Compound File Binary header signature ([MS-CFB] §2.2).
//        Old .xls workbooks are such files, and so are password-protected .xlsx workbooks:
//        [MS-OFFCRYPTO] §2.3.4.4 stores the encrypted package as a stream named
//        "EncryptedPackage" beside "EncryptionInfo" inside a compound file.

export type FileKind = 'empty' | 'zip' | 'ole' | 'utf16-text' | 'binary' | 'text';

const OLE_MAGIC = [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1];

export function sniffFileKind(head: Uint8Array): FileKind {
  if (head.length === 0) return 'empty';
  if (head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x03 && head[3] === 0x04) return 'zip';
  // An empty zip archive starts directly with the end-of-central-directory record.
  if (head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x05 && head[3] === 0x06) return 'zip';
  if (head.length >= 8 && OLE_MAGIC.every((b, i) => head[i] === b)) return 'ole';
  if (head.length >= 2 && ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff))) return 'utf16-text';
  const n = Math.min(head.length, 8192);
  for (let i = 0; i < n; i++) if (head[i] === 0) return 'binary';
  return 'text';
}

function utf16le(text: string): Uint8Array {
  const out = new Uint8Array(text.length * 2);
  for (let i = 0; i < text.length; i++) out[i * 2] = text.charCodeAt(i);
  return out;
}

const ENCRYPTED_PACKAGE = utf16le('EncryptedPackage');

function indexOfBytes(haystack: Uint8Array, needle: Uint8Array): number {
  const first = needle[0];
  outer: for (let i = haystack.indexOf(first!); i >= 0 && i <= haystack.length - needle.length; i = haystack.indexOf(first!, i + 1)) {
    for (let j = 1; j < needle.length; j++) if (haystack[i + j] !== needle[j]) continue outer;
    return i;
  }
  return -1;
}

/** True when a compound file holds an "EncryptedPackage" stream: a password-protected workbook. */
export function oleIsEncryptedPackage(bytes: Uint8Array): boolean {
  return indexOfBytes(bytes, ENCRYPTED_PACKAGE) >= 0;
}
