// Checking an .xlsx package before read-xlsx.ts reads it. An .xlsx file is a zip archive (ECMA-376
// Part 2, Open Packaging Conventions); the layout below follows PKWARE's APPNOTE.TXT 6.3.10:
//   §4.3.16 end of central directory record, §4.3.14/15 Zip64 end record and locator,
//   §4.3.12 central directory file header, §4.3.7 local file header, §4.3.9 data descriptor,
//   §4.5.3 Zip64 extended information extra field, §4.4.4 general purpose bit flag.
// Two guards: (1) the sizes the central directory declares must add up to no more than the
// limit (a "zip bomb" unpacks a small file into gigabytes); (2) every part but the worksheets
// is unpacked once here, counting the bytes really produced and checking the CRC-32 the archive
// records, so a truncated, damaged or lying file is refused with a plain message instead of
// reaching the XML parser. A worksheet is unpacked here only until its first value shows (to
// tell empty sheets from sheets with data); the sheet that is read is checked the same way, in
// full, as read-xlsx.ts unpacks it (xlsx/zip-part.ts), so the largest part is unpacked once.
// While unpacking, the workbook's sheet list is read.

import { createReadStream } from 'node:fs';
import { open } from 'node:fs/promises';
import { Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { createInflateRaw, crc32 } from 'node:zlib';

export interface ZipEntry {
  name: string;
  method: number;
  flags: number;
  crc: number;
  compressedSize: number;
  uncompressedSize: number;
  localHeaderOffset: number;
  /** Offset of the part's compressed bytes (after the local header). */
  dataStart: number;
}

export interface SheetInfo {
  name: string;
  /** visible, hidden or veryHidden (ECMA-376 Part 1 §18.18.68). */
  state: string;
  /** Zip path of the sheet's XML part, or null when the workbook does not say. */
  part: string | null;
  /** The part holds at least one cell value. */
  hasValue: boolean;
}

export interface WorkbookInfo {
  sheets: SheetInfo[];
  totalUncompressed: number;
  /** The package's parts, as the central directory lists them (checked). */
  entries: ZipEntry[];
}

/** Why the package was refused: a plain sentence and a code for tests and logs. */
export class ZipRefusal extends Error {
  constructor(readonly code: 'damaged' | 'too-large' | 'not-workbook' | 'encrypted' | 'unsupported' | 'cancelled', message: string) {
    super(message);
  }
}

const EOCD_SIG = 0x06054b50;
const EOCD64_SIG = 0x06064b50;
const EOCD64_LOCATOR_SIG = 0x07064b50;
const CDH_SIG = 0x02014b50;
const LFH_SIG = 0x04034b50;
const MAX_ENTRIES = 100_000;

export const DAMAGED = 'The workbook file is damaged or incomplete (it may have been cut short while copying or downloading). Ask for the file again, or open it in Excel and save it again.';

async function readAt(fh: Awaited<ReturnType<typeof open>>, position: number, length: number): Promise<Buffer> {
  const buf = Buffer.alloc(length);
  const { bytesRead } = await fh.read(buf, 0, length, position);
  return buf.subarray(0, bytesRead);
}

function u64(buf: Buffer, at: number): number {
  const value = buf.readBigUInt64LE(at);
  return value > BigInt(Number.MAX_SAFE_INTEGER) ? Number.POSITIVE_INFINITY : Number(value);
}

/** Read the central directory. Throws ZipRefusal. */
export async function readCentralDirectory(path: string, fileSize: number): Promise<ZipEntry[]> {
  const fh = await open(path, 'r');
  try {
    // §4.3.16: the end record is 22 bytes plus a comment of up to 65,535 bytes.
    const tailLength = Math.min(fileSize, 22 + 65_535);
    const tail = await readAt(fh, fileSize - tailLength, tailLength);
    let eocd = -1;
    for (let i = tail.length - 22; i >= 0; i--) {
      if (tail.readUInt32LE(i) === EOCD_SIG && i + 22 + tail.readUInt16LE(i + 20) === tail.length) {
        eocd = i;
        break;
      }
    }
    if (eocd < 0) throw new ZipRefusal('damaged', DAMAGED);
    let entryCount = tail.readUInt16LE(eocd + 10);
    let cdSize = tail.readUInt32LE(eocd + 12);
    let cdOffset = tail.readUInt32LE(eocd + 16);
    const eocdPosition = fileSize - tailLength + eocd;
    if (entryCount === 0xffff || cdSize === 0xffffffff || cdOffset === 0xffffffff) {
      // Zip64: the locator sits just before the end record (§4.3.15).
      const locator = await readAt(fh, eocdPosition - 20, 20);
      if (locator.length < 20 || locator.readUInt32LE(0) !== EOCD64_LOCATOR_SIG) throw new ZipRefusal('damaged', DAMAGED);
      const record = await readAt(fh, u64(locator, 8), 56);
      if (record.length < 56 || record.readUInt32LE(0) !== EOCD64_SIG) throw new ZipRefusal('damaged', DAMAGED);
      entryCount = u64(record, 32);
      cdSize = u64(record, 40);
      cdOffset = u64(record, 48);
    }
    if (entryCount > MAX_ENTRIES || !(cdOffset + cdSize <= eocdPosition)) throw new ZipRefusal('damaged', DAMAGED);
    const cd = await readAt(fh, cdOffset, cdSize);
    if (cd.length !== cdSize) throw new ZipRefusal('damaged', DAMAGED);
    const entries: ZipEntry[] = [];
    let at = 0;
    for (let k = 0; k < entryCount; k++) {
      if (at + 46 > cd.length || cd.readUInt32LE(at) !== CDH_SIG) throw new ZipRefusal('damaged', DAMAGED);
      const flags = cd.readUInt16LE(at + 8);
      const method = cd.readUInt16LE(at + 10);
      const crc = cd.readUInt32LE(at + 16);
      let compressedSize = cd.readUInt32LE(at + 20);
      let uncompressedSize = cd.readUInt32LE(at + 24);
      const nameLength = cd.readUInt16LE(at + 28);
      const extraLength = cd.readUInt16LE(at + 30);
      const commentLength = cd.readUInt16LE(at + 32);
      let localHeaderOffset = cd.readUInt32LE(at + 42);
      const end = at + 46 + nameLength + extraLength + commentLength;
      if (end > cd.length) throw new ZipRefusal('damaged', DAMAGED);
      const name = cd.subarray(at + 46, at + 46 + nameLength).toString((flags & 0x800) !== 0 ? 'utf8' : 'latin1');
      // §4.5.3: the Zip64 extra field holds, in order, only the values whose 32-bit field is all ones.
      let x = at + 46 + nameLength;
      const extraEnd = x + extraLength;
      while (x + 4 <= extraEnd) {
        const id = cd.readUInt16LE(x);
        const size = cd.readUInt16LE(x + 2);
        if (id === 0x0001) {
          let p = x + 4;
          const stop = Math.min(p + size, extraEnd);
          if (uncompressedSize === 0xffffffff && p + 8 <= stop) { uncompressedSize = u64(cd, p); p += 8; }
          if (compressedSize === 0xffffffff && p + 8 <= stop) { compressedSize = u64(cd, p); p += 8; }
          if (localHeaderOffset === 0xffffffff && p + 8 <= stop) { localHeaderOffset = u64(cd, p); p += 8; }
        }
        x += 4 + size;
      }
      entries.push({ name, method, flags, crc, compressedSize, uncompressedSize, localHeaderOffset, dataStart: -1 });
      at = end;
    }
    // Where each part's data starts: read the local headers and check them against the directory.
    let expected = 0;
    let previous: ZipEntry | undefined;
    const sorted = [...entries].sort((a, b) => a.localHeaderOffset - b.localHeaderOffset);
    for (const entry of sorted) {
      if (!follows(expected, entry.localHeaderOffset, previous)) throw new ZipRefusal('damaged', DAMAGED);
      const lfh = await readAt(fh, entry.localHeaderOffset, 30);
      if (lfh.length < 30 || lfh.readUInt32LE(0) !== LFH_SIG) throw new ZipRefusal('damaged', DAMAGED);
      const nameLength = lfh.readUInt16LE(26);
      const extraLength = lfh.readUInt16LE(28);
      const localName = (await readAt(fh, entry.localHeaderOffset + 30, nameLength)).toString((entry.flags & 0x800) !== 0 ? 'utf8' : 'latin1');
      const localMethod = lfh.readUInt16LE(8);
      const localCompressed = lfh.readUInt32LE(18);
      if (localName !== entry.name || localMethod !== entry.method) throw new ZipRefusal('damaged', DAMAGED);
      if ((entry.flags & 0x8) === 0 && localCompressed !== 0xffffffff && localCompressed !== entry.compressedSize) {
        throw new ZipRefusal('damaged', DAMAGED);
      }
      entry.dataStart = entry.localHeaderOffset + 30 + nameLength + extraLength;
      expected = entry.dataStart + entry.compressedSize;
      previous = entry;
    }
    if (!follows(expected, cdOffset, previous)) throw new ZipRefusal('damaged', DAMAGED);
    return entries;
  } finally {
    await fh.close();
  }
}

/** Parts must follow one another with no gap, except a data descriptor (§4.3.9: 12 or 16
 *  bytes, 20 or 24 with Zip64) after a part written with bit 3 of its flags set. */
function follows(expected: number, actual: number, previous: ZipEntry | undefined): boolean {
  if (actual === expected) return true;
  if (previous === undefined || (previous.flags & 0x8) === 0) return false;
  const gap = actual - expected;
  return gap === 12 || gap === 16 || gap === 20 || gap === 24;
}

/** Decode the five XML entities and numeric character references (XML 1.0 §4.1, §4.6). */
export function xmlUnescape(text: string): string {
  return text.replace(/&(amp|lt|gt|quot|apos|#x[0-9a-fA-F]+|#\d+);/g, (_m, e: string) => {
    switch (e) {
      case 'amp': return '&';
      case 'lt': return '<';
      case 'gt': return '>';
      case 'quot': return '"';
      case 'apos': return "'";
      default: {
        const code = e.startsWith('#x') ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10);
        return Number.isFinite(code) && code <= 0x10ffff ? String.fromCodePoint(code) : '';
      }
    }
  });
}

function attributes(tag: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const m of tag.matchAll(/([\w:.-]+)\s*=\s*(?:"([^"]*)"|'([^']*)')/g)) out.set(m[1]!, xmlUnescape(m[2] ?? m[3] ?? ''));
  return out;
}

/** Sheets listed in xl/workbook.xml (ECMA-376 Part 1 §18.2.19, §18.2.20), with their parts. */
export function sheetsOfWorkbook(workbookXml: string, relsXml: string): Array<{ name: string; state: string; part: string | null }> {
  const targets = new Map<string, string>();
  for (const m of relsXml.matchAll(/<(?:\w+:)?Relationship\b([^>]*)>/g)) {
    const a = attributes(m[1]!);
    const id = a.get('Id');
    const target = a.get('Target');
    if (id !== undefined && target !== undefined) targets.set(id, target);
  }
  const sheets: Array<{ name: string; state: string; part: string | null }> = [];
  for (const m of workbookXml.matchAll(/<(?:\w+:)?sheet\b([^>]*)>/g)) {
    const a = attributes(m[1]!);
    const name = a.get('name');
    if (name === undefined) continue;
    let rid: string | undefined;
    for (const [k, v] of a) if (k === 'id' || k.endsWith(':id')) rid = v;
    const target = rid === undefined ? undefined : targets.get(rid);
    let part: string | null = null;
    if (target !== undefined) part = target.startsWith('/') ? target.slice(1) : `xl/${target.replace(/^\.\//, '')}`;
    sheets.push({ name, state: a.get('state') ?? 'visible', part });
  }
  return sheets;
}

interface PartScan {
  hasValue: boolean;
}

// A cell value (v) or inline string (is), with or without a namespace prefix (x:v).
const VALUE_TAG = /<(?:[A-Za-z_][\w.-]*:)?(?:v|is)[\s>]/;

function scanSheetChunk(buf: Buffer, scan: PartScan): void {
  if (VALUE_TAG.test(buf.toString('latin1'))) scan.hasValue = true;
}

/** Thrown inside the unpacking of a worksheet once its first value showed. */
class SeenEnough extends Error {}

/**
 * Check the package and describe its sheets. Throws ZipRefusal with a plain message.
 * `limit`: refuse when the parts would unpack to more bytes than this.
 */
export async function inspectWorkbookZip(path: string, fileSize: number, limit: number, signal?: AbortSignal): Promise<WorkbookInfo> {
  const entries = await readCentralDirectory(path, fileSize);
  let declared = 0;
  for (const e of entries) declared += e.uncompressedSize;
  const tooLarge = (bytes: number) => new ZipRefusal(
    'too-large',
    `The workbook would unpack to ${formatBytes(bytes)}, more than the limit of ${formatBytes(limit)}. Such a file is either damaged or built to exhaust memory. Export the sheet as CSV, or raise the unpacked-size limit if you trust the file.`,
  );
  if (declared > limit) throw tooLarge(declared);
  const byName = new Map(entries.map((e) => [e.name, e] as const));
  if (!byName.has('xl/workbook.xml')) {
    const what = byName.has('word/document.xml') ? ' It looks like a Word document.' : byName.has('ppt/presentation.xml') ? ' It looks like a PowerPoint file.' : '';
    throw new ZipRefusal('not-workbook', `The file is a zip archive but not an Excel workbook.${what} Save the data from Excel as .xlsx or .csv.`);
  }
  const texts = new Map<string, string>();
  const scans = new Map<string, PartScan>();
  let produced = 0;
  for (const entry of entries) {
    if (signal?.aborted) throw new ZipRefusal('cancelled', 'The import was cancelled.');
    if ((entry.flags & 0x1) !== 0) {
      throw new ZipRefusal('encrypted', 'The workbook is protected with a password. Open it in Excel, remove the password (File › Info › Protect Workbook), save it, and try again.');
    }
    if (entry.method !== 0 && entry.method !== 8) {
      throw new ZipRefusal('unsupported', `The workbook is packed in a way Fenceline does not read (zip method ${entry.method}). Open it in Excel and save it again as .xlsx.`);
    }
    const start = entry.dataStart;
    const keepText = entry.name === 'xl/workbook.xml' || entry.name === 'xl/_rels/workbook.xml.rels';
    const isSheet = /^xl\/worksheets\/[^/]+\.xml$/.test(entry.name);
    const scan: PartScan = { hasValue: false };
    const chunks: Buffer[] = [];
    let crc = 0;
    let size = 0;
    let carry: Buffer = Buffer.alloc(0);
    const sink = new Writable({
      write(chunk: Buffer, _enc, done) {
        size += chunk.length;
        produced += chunk.length;
        if (size > entry.uncompressedSize) {
          done(produced > limit ? tooLarge(produced) : new ZipRefusal('damaged', DAMAGED));
          return;
        }
        crc = crc32(chunk, crc);
        if (keepText) chunks.push(chunk);
        if (isSheet) {
          const joined = carry.length > 0 ? Buffer.concat([carry, chunk]) : chunk;
          scanSheetChunk(joined, scan);
          if (scan.hasValue) {
            done(new SeenEnough());
            return;
          }
          carry = Buffer.from(joined.subarray(Math.max(0, joined.length - 64)));
        }
        done();
      },
    });
    const input = entry.compressedSize === 0
      ? [Buffer.alloc(0)]
      : createReadStream(path, { start, end: start + entry.compressedSize - 1 });
    try {
      if (entry.method === 8) await pipeline(input, createInflateRaw(), sink, { signal });
      else await pipeline(input, sink, { signal });
    } catch (err) {
      if (err instanceof SeenEnough) {
        scans.set(entry.name, scan);
        continue;
      }
      if (err instanceof ZipRefusal) throw err;
      if (signal?.aborted) throw new ZipRefusal('cancelled', 'The import was cancelled.');
      throw new ZipRefusal('damaged', DAMAGED);
    }
    if (size !== entry.uncompressedSize || (crc >>> 0) !== (entry.crc >>> 0)) throw new ZipRefusal('damaged', DAMAGED);
    if (keepText) texts.set(entry.name, Buffer.concat(chunks).toString('utf8'));
    if (isSheet) scans.set(entry.name, scan);
  }
  const listed = sheetsOfWorkbook(texts.get('xl/workbook.xml') ?? '', texts.get('xl/_rels/workbook.xml.rels') ?? '');
  const sheets: SheetInfo[] = listed.map((s) => {
    const scan = s.part === null ? undefined : scans.get(s.part);
    return { ...s, hasValue: scan?.hasValue ?? false };
  });
  return { sheets, totalUncompressed: declared, entries };
}

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 ** 3) return `${(bytes / 1024 ** 3).toFixed(1)} GB`;
  if (bytes >= 1024 ** 2) return `${(bytes / 1024 ** 2).toFixed(1)} MB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${bytes} bytes`;
}
