// readTable: from an agency's file (.xlsx, .csv, .txt) to typed columns, or one clear message
// saying what is wrong with the file and what to do. Order of work: the file must exist; its
// first bytes say what it really is (sniff.ts); its SHA-256 is taken; a workbook's zip package
// is checked (zip-check.ts) before read-xlsx.ts reads it; rows stream into a TableBuilder.

import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { open, stat } from 'node:fs/promises';
import { isUtf8 } from 'node:buffer';
import { basename, extname } from 'node:path';
import type { Checked, Problem } from '../rules/types.ts';
import { placePath } from './locate.ts';
import { classifyCsvField, readCsvRows } from './read-csv.ts';
import { classifySheetCell, readXlsxRows } from './read-xlsx.ts';
import { closestName } from './similar.ts';
import { oleIsEncryptedPackage, sniffFileKind } from './sniff.ts';
import { TableBuilder } from './table-builder.ts';
import { DEFAULT_MAX_UNCOMPRESSED_BYTES, type RawTable, type ReadTableOptions, type TableNote } from './types.ts';
import { inspectWorkbookZip, ZipRefusal, type SheetInfo } from './zip-check.ts';

export const IMPORT_CANCELLED = 'The import was cancelled.';

const ENCRYPTED = 'The workbook is protected with a password, so its contents cannot be read. Open it in Excel, remove the password (File › Info › Protect Workbook › Encrypt with Password, clear it), save it, and try again.';
const OLD_XLS = 'The file is an old-format Excel workbook (Excel 97–2003, .xls), which Fenceline does not read. Open it in Excel and use File › Save As › Excel Workbook (.xlsx), then choose the new file.';
/** Compound files are scanned this far for the encryption stream (the directory is near the start or end). */
const OLE_SCAN_BYTES = 64 * 1024 * 1024;

function refuse(path: string, message: string): { ok: false; problems: Problem[] } {
  return { ok: false, problems: [{ path, message }] };
}

interface HashResult {
  sha256: string;
  utf8: boolean;
}

/** SHA-256 of the file bytes (FIPS 180-4) and whether the bytes are valid UTF-8, in one pass. */
export async function hashFile(path: string, checkUtf8: boolean, signal?: AbortSignal): Promise<HashResult> {
  const hash = createHash('sha256');
  let utf8 = true;
  let carry: Buffer = Buffer.alloc(0);
  for await (const piece of createReadStream(path, { signal })) {
    const chunk = piece as Buffer;
    hash.update(chunk);
    if (checkUtf8 && utf8) {
      // A character's bytes may straddle two chunks: hold back an unfinished sequence.
      const joined = carry.length > 0 ? Buffer.concat([carry, chunk]) : chunk;
      let cut = joined.length;
      for (let back = 1; back <= 3 && back <= joined.length; back++) {
        const byte = joined[joined.length - back]!;
        if ((byte & 0xc0) === 0x80) continue;
        const need = byte >= 0xf0 ? 4 : byte >= 0xe0 ? 3 : byte >= 0xc0 ? 2 : 1;
        if (need > back) cut = joined.length - back;
        break;
      }
      if (!isUtf8(joined.subarray(0, cut))) utf8 = false;
      carry = Buffer.from(joined.subarray(cut));
    }
  }
  if (checkUtf8 && utf8 && carry.length > 0 && !isUtf8(carry)) utf8 = false;
  return { sha256: hash.digest('hex'), utf8 };
}

async function readHead(path: string, length: number): Promise<Buffer> {
  const fh = await open(path, 'r');
  try {
    const buf = Buffer.alloc(length);
    const { bytesRead } = await fh.read(buf, 0, length, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

export function fileProblem(err: unknown, path: string, fileName: string): Problem {
  const code = (err as { code?: unknown }).code;
  if (code === 'ENOENT' || code === 'ENOTDIR') return { path: fileName, message: `There is no file ${fileName} at ${path}. Check the file name and the folder (a path in a study file is relative to the study file).` };
  if (code === 'EACCES' || code === 'EPERM') return { path: fileName, message: `The file ${fileName} cannot be opened: this account is not allowed to read it. Copy it to a folder you own, or ask for read permission.` };
  if (code === 'EBUSY') return { path: fileName, message: `The file ${fileName} is locked by another program (perhaps open in Excel). Close it there and try again.` };
  if (code === 'EISDIR') return { path: fileName, message: `${path} is a folder, not a file. Choose the data file inside it.` };
  return { path: fileName, message: `The file ${fileName} could not be read (${typeof code === 'string' ? code : 'read error'}). Check that it is on this computer and not still being copied.` };
}

/** Which delimiter the first line uses: comma, else tab, else semicolon (then a note says so). */
function guessDelimiter(head: Buffer): string {
  let text = head.toString('latin1');
  const end = text.search(/\r|\n/);
  if (end >= 0) text = text.slice(0, end);
  if (text.includes(',')) return ',';
  if (text.includes('\t')) return '\t';
  if (text.includes(';')) return ';';
  return ',';
}

function findSheet(sheets: SheetInfo[], wanted: string): SheetInfo | undefined {
  return sheets.find((s) => s.name === wanted) ?? sheets.find((s) => s.name.trim().toLowerCase() === wanted.trim().toLowerCase());
}

export async function readTable(path: string, opts: ReadTableOptions = {}): Promise<Checked<RawTable>> {
  const fileName = basename(path);
  try {
    return await readTableUnguarded(path, fileName, opts);
  } catch (err) {
    // Anything not foreseen still ends as one plain message, never as a thrown exception.
    if (opts.signal?.aborted) return refuse(fileName, IMPORT_CANCELLED);
    const code = (err as { code?: unknown }).code;
    if (typeof code === 'string' && /^E[A-Z]+$/.test(code)) return { ok: false, problems: [fileProblem(err, path, fileName)] };
    return refuse(fileName, `The file ${fileName} could not be read: it is damaged or in a form Fenceline does not understand. Open it in Excel and save it again as .xlsx or .csv.`);
  }
}

/** The data file's size in bytes, or one plain message when it is missing, unreadable or a folder. */
export async function dataFileSize(path: string, fileName: string): Promise<Checked<number>> {
  try {
    const info = await stat(path);
    if (info.isDirectory()) return refuse(fileName, `${path} is a folder, not a file. Choose the data file inside it.`);
    return { ok: true, value: info.size };
  } catch (err) {
    return { ok: false, problems: [fileProblem(err, path, fileName)] };
  }
}

async function readTableUnguarded(path: string, fileName: string, opts: ReadTableOptions): Promise<Checked<RawTable>> {
  const { signal, onProgress } = opts;
  if (signal?.aborted) return refuse(fileName, IMPORT_CANCELLED);
  const sized = await dataFileSize(path, fileName);
  if (!sized.ok) return sized;
  const size = sized.value;
  if (opts.headerRow !== undefined && !(Number.isInteger(opts.headerRow) && opts.headerRow >= 1)) {
    return refuse(fileName, `The header row must be a whole row number, 1 or more (got ${String(opts.headerRow)}).`);
  }
  const ext = extname(fileName).toLowerCase();
  const isWorkbookName = ext === '.xlsx' || ext === '.xlsm';
  const isTextName = ext === '.csv' || ext === '.txt';
  if (ext === '.parquet') {
    return refuse(fileName, `${fileName} is a Parquet file: evaluate and check read it in chunks (a file beyond one sheet, docs/study-format.md), but this view shows .xlsx and .csv files only. Name it as data.path in the study and run check or evaluate.`);
  }
  if (!isWorkbookName && !isTextName && ext !== '.xls') {
    return refuse(fileName, `Fenceline reads Excel workbooks (.xlsx) and comma-separated text (.csv); ${fileName} is neither. Save the data from its program as .xlsx or .csv.`);
  }
  if (size === 0) return refuse(fileName, `The file ${fileName} is empty (0 bytes). Ask for the file again.`);
  const head = await readHead(path, 8192);
  const kind = sniffFileKind(head);
  if (kind === 'ole') {
    const probe = await readHead(path, Math.min(size, OLE_SCAN_BYTES));
    return refuse(fileName, oleIsEncryptedPackage(probe) ? ENCRYPTED : OLD_XLS);
  }
  if (ext === '.xls') {
    return refuse(fileName, kind === 'zip'
      ? `The file ${fileName} is a current Excel workbook with an old .xls name. Rename it to end in .xlsx and try again.`
      : OLD_XLS);
  }
  if (isWorkbookName && kind !== 'zip') {
    return refuse(fileName, kind === 'text'
      ? `The file ${fileName} is named like an Excel workbook but holds plain text. If it is comma-separated data, rename it to end in .csv; otherwise open it in Excel and save it as .xlsx.`
      : `The file ${fileName} is not an Excel workbook, or it is damaged. Open it in Excel and save it again as .xlsx.`);
  }
  if (isTextName && kind !== 'text') {
    const why = kind === 'zip'
      ? `is an Excel workbook saved with a ${ext} name. Rename it to end in .xlsx and try again.`
      : kind === 'utf16-text'
        ? `is saved as UTF-16 ("Unicode text"). In Excel choose File › Save As › "CSV UTF-8 (Comma delimited)".`
        : 'is not a text file (it holds binary data). Check that it is the right file, or save the data again as CSV.';
    return refuse(fileName, `The file ${fileName} ${why}`);
  }

  const notes: TableNote[] = [];
  const hashed = await hashFile(path, kind === 'text', signal);
  if (signal?.aborted) return refuse(fileName, IMPORT_CANCELLED);

  if (kind === 'zip') {
    return readWorkbook(path, fileName, size, hashed.sha256, opts, notes);
  }

  // ---- CSV / text -----------------------------------------------------------------------
  const delimiter = guessDelimiter(head);
  if (delimiter !== ',') {
    notes.push({ code: 'delimiter', message: `${fileName}: values are separated by ${delimiter === '\t' ? 'tabs' : 'semicolons'}, not commas; read that way.` });
  }
  const encoding = hashed.utf8 ? 'utf8' : 'latin1';
  if (!hashed.utf8) {
    notes.push({ code: 'encoding', message: `${fileName} is not UTF-8 text; it was read as Western (Windows Latin-1). If accented letters look wrong, save it from Excel as "CSV UTF-8".` });
  }
  const place = (row?: number, column?: string) => placePath(fileName, null, row, column);
  const builder = new TableBuilder(classifyCsvField, place, `in ${fileName}`, opts.headerRow);
  let lastShown = -1;
  const problem = await readCsvRows(path, builder, place, {
    delimiter,
    encoding,
    signal,
    onBytes: (done) => {
      if (onProgress !== undefined && (done - lastShown >= size / 100 || done === size)) {
        lastShown = done;
        onProgress({ stage: 'import', done, total: size });
      }
    },
  });
  if (signal?.aborted) return refuse(fileName, IMPORT_CANCELLED);
  if (problem !== null) return { ok: false, problems: [problem] };
  const built = builder.finish();
  if (!built.ok) return built;
  onProgress?.({ stage: 'import', done: size, total: size });
  return {
    ok: true,
    value: {
      source: { path, fileName, format: 'csv', sheet: null, sheets: [], sha256: hashed.sha256, bytes: size },
      ...built.value,
      notes: [...notes, ...built.value.notes],
    },
  };
}

async function readWorkbook(
  path: string,
  fileName: string,
  size: number,
  sha256: string,
  opts: ReadTableOptions,
  notes: TableNote[],
): Promise<Checked<RawTable>> {
  const { signal, onProgress } = opts;
  let info;
  try {
    info = await inspectWorkbookZip(path, size, opts.maxUncompressedBytes ?? DEFAULT_MAX_UNCOMPRESSED_BYTES, signal);
  } catch (err) {
    if (err instanceof ZipRefusal) return refuse(fileName, err.code === 'encrypted' ? ENCRYPTED : err.message);
    throw err;
  }
  const sheets = info.sheets;
  const names = sheets.map((s) => s.name);
  if (sheets.length === 0) return refuse(fileName, `The workbook ${fileName} lists no sheets. Open it in Excel and save it again.`);
  let sheet: SheetInfo | undefined;
  if (opts.sheet !== undefined) {
    sheet = findSheet(sheets, opts.sheet);
    if (sheet === undefined) {
      const near = closestName(opts.sheet, names);
      return refuse(placePath(fileName, opts.sheet), `There is no sheet named ${opts.sheet} in ${fileName}${near !== null ? `; did you mean ${near}?` : '.'} Its sheets are: ${names.join(', ')}.`);
    }
    if (!sheet.hasValue) return refuse(placePath(fileName, sheet.name), `Sheet ${sheet.name} in ${fileName} is empty. Its sheets are: ${names.join(', ')}; choose the one that holds the data.`);
  } else {
    sheet = sheets.find((s) => s.hasValue && s.state === 'visible') ?? sheets.find((s) => s.hasValue);
    if (sheet === undefined) return refuse(fileName, `Every sheet of ${fileName} is empty (sheets: ${names.join(', ')}).`);
    if (sheets.length > 1) {
      notes.push({ code: 'sheet-chosen', message: `Read sheet ${sheet.name}, the first sheet with data in ${fileName} (the workbook also has: ${names.filter((n) => n !== sheet!.name).join(', ')}).` });
    }
  }
  const chosen = sheet;
  if (chosen.part === null || !/^xl\/worksheets\/sheet\d+\.xml$/.test(chosen.part)) {
    return refuse(placePath(fileName, chosen.name), `Sheet ${chosen.name} of ${fileName} is stored in a way Fenceline does not read (it may be a chart sheet). Open the workbook in Excel, save it again as .xlsx, and try again.`);
  }
  const place = (row?: number, column?: string) => placePath(fileName, chosen.name, row, column);
  const builder = new TableBuilder(classifySheetCell, place, `in sheet ${chosen.name} of ${fileName}`, opts.headerRow);
  // Progress in bytes of the sheet's XML, shown in steps of at least 1%.
  let total = 1;
  let lastShown = 0;
  const problem = await readXlsxRows(path, info, chosen, builder, place, {
    signal,
    onBytes: (done, of) => {
      total = Math.max(1, of);
      if (onProgress !== undefined && (done - lastShown >= total / 100 || done === of)) {
        lastShown = done;
        onProgress({ stage: 'import', done: Math.min(done, total), total });
      }
    },
  });
  if (signal?.aborted) return refuse(fileName, IMPORT_CANCELLED);
  if (problem !== null) return { ok: false, problems: [problem] };
  const built = builder.finish();
  if (!built.ok) return built;
  onProgress?.({ stage: 'import', done: total, total });
  return {
    ok: true,
    value: {
      source: { path, fileName, format: 'xlsx', sheet: chosen.name, sheets: names, sha256, bytes: size },
      ...built.value,
      notes: [...notes, ...built.value.notes],
    },
  };
}
