// Test helpers: temporary folders and small files built in code (CSV text, xlsx workbooks
// through exceljs, compound-file headers), so the fixtures stay small and readable.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { crc32, deflateRawSync } from 'node:zlib';
import ExcelJS from 'exceljs';
import { afterAll } from 'vitest';
import { readTable } from '../../main/data/read-table.ts';
import type { RawTable } from '../../main/data/types.ts';

/** A temporary folder removed after the test file. */
export function tempDir(): string {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-data-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  return dir;
}

let counter = 0;
export function writeFile(dir: string, name: string, content: string | Uint8Array): string {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
}

export function uniqueName(ext: string): string {
  counter++;
  return `file${counter}${ext}`;
}

export type SheetRows = Array<Array<ExcelJS.CellValue>>;

/** Write a workbook whose sheets hold the given rows (row 1 first; `[]` leaves a row empty). */
export async function writeXlsx(dir: string, name: string, sheets: Record<string, SheetRows>): Promise<string> {
  const wb = new ExcelJS.Workbook();
  for (const [sheetName, rows] of Object.entries(sheets)) {
    const ws = wb.addWorksheet(sheetName);
    rows.forEach((row, i) => {
      if (row.length === 0) return;
      const r = ws.getRow(i + 1);
      row.forEach((value, c) => {
        if (value !== undefined) r.getCell(c + 1).value = value;
      });
      r.commit();
    });
  }
  const path = join(dir, name);
  await wb.xlsx.writeFile(path);
  return path;
}

export async function xlsxBytes(sheets: Record<string, SheetRows>): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  for (const [sheetName, rows] of Object.entries(sheets)) {
    const ws = wb.addWorksheet(sheetName);
    for (const row of rows) ws.addRow(row);
  }
  return new Uint8Array(await wb.xlsx.writeBuffer());
}

/** Read a table that must import; fail the test with its messages otherwise. */
export async function mustRead(path: string, opts: Parameters<typeof readTable>[1] = {}): Promise<RawTable> {
  const got = await readTable(path, opts);
  if (!got.ok) throw new Error(`expected an import, got: ${got.problems.map((p) => `${p.path}: ${p.message}`).join(' | ')}`);
  return got.value;
}

/** Read a table that must be refused; return its single message (and path). */
export async function mustRefuse(path: string, opts: Parameters<typeof readTable>[1] = {}): Promise<{ path: string; message: string }> {
  const got = await readTable(path, opts);
  if (got.ok) throw new Error(`expected a refusal, got a table of ${got.value.rowCount} rows`);
  if (got.problems.length !== 1) throw new Error(`expected one message, got ${got.problems.length}`);
  return got.problems[0]!;
}

/**
 * A minimal Compound File Binary file ([MS-CFB] §2.2 header, §2.6 directory entries): a
 * 512-byte header with the signature D0 CF 11 E0 A1 B1 1A E1, then one directory sector
 * holding entries with the given stream names (UTF-16LE, 64 bytes, then the name length).
 * Enough for a reader that identifies the file by its signature and stream names.
 */
export function compoundFile(streamNames: string[]): Uint8Array {
  const header = new Uint8Array(512);
  header.set([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1], 0);
  const view = new DataView(header.buffer);
  view.setUint16(0x18, 0x003e, true); // minor version
  view.setUint16(0x1a, 0x0003, true); // major version 3 (512-byte sectors)
  view.setUint16(0x1c, 0xfffe, true); // byte order mark
  view.setUint16(0x1e, 0x0009, true); // sector shift: 2^9 = 512
  view.setUint16(0x20, 0x0006, true); // mini sector shift
  view.setUint32(0x30, 0, true); // first directory sector
  const dir = new Uint8Array(512);
  ['Root Entry', ...streamNames].slice(0, 4).forEach((name, i) => {
    const at = i * 128;
    for (let k = 0; k < name.length; k++) dir[at + k * 2] = name.charCodeAt(k);
    new DataView(dir.buffer).setUint16(at + 64, (name.length + 1) * 2, true);
    dir[at + 66] = i === 0 ? 5 : 2; // object type: root storage / stream
  });
  const out = new Uint8Array(1024);
  out.set(header, 0);
  out.set(dir, 512);
  return out;
}

export interface ZipPart {
  name: string;
  data: Uint8Array;
  /** Deflate the part (default: store it). */
  deflate?: boolean;
  /** Uncompressed size to write in the central directory instead of the true one (a lie). */
  declaredSize?: number;
}

/**
 * A small zip writer (PKWARE APPNOTE.TXT 6.3.10 §4.3.7 local header, §4.3.12 central directory
 * header, §4.3.16 end record), so tests control every field, including false ones.
 */
export function makeZip(parts: ZipPart[]): Uint8Array {
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;
  for (const part of parts) {
    const name = Buffer.from(part.name, 'utf8');
    const data = part.deflate ? deflateRawSync(part.data) : Buffer.from(part.data);
    const crc = crc32(part.data) >>> 0;
    const size = part.declaredSize ?? part.data.length;
    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(20, 4);
    local.writeUInt16LE(0x800, 6);
    local.writeUInt16LE(part.deflate ? 8 : 0, 8);
    local.writeUInt32LE(crc, 14);
    local.writeUInt32LE(data.length, 18);
    local.writeUInt32LE(size, 22);
    local.writeUInt16LE(name.length, 26);
    const central = Buffer.alloc(46);
    central.writeUInt32LE(0x02014b50, 0);
    central.writeUInt16LE(20, 4);
    central.writeUInt16LE(20, 6);
    central.writeUInt16LE(0x800, 8);
    central.writeUInt16LE(part.deflate ? 8 : 0, 10);
    central.writeUInt32LE(crc, 16);
    central.writeUInt32LE(data.length, 20);
    central.writeUInt32LE(size, 24);
    central.writeUInt16LE(name.length, 28);
    central.writeUInt32LE(offset, 42);
    locals.push(local, name, data);
    centrals.push(central, name);
    offset += 30 + name.length + data.length;
  }
  const cd = Buffer.concat(centrals);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(parts.length, 8);
  end.writeUInt16LE(parts.length, 10);
  end.writeUInt32LE(cd.length, 12);
  end.writeUInt32LE(offset, 16);
  return new Uint8Array(Buffer.concat([...locals, cd, end]));
}
