// Fix every entry's modification time in a ZIP archive (DOCX and XLSX are ZIP packages), so the
// same document always gives the same bytes. The docx and exceljs libraries stamp entries with the
// clock and offer no option for it. The date and time fields are outside every CRC, so rewriting
// them in place is safe. Layout from PKWARE's APPNOTE.TXT (.ZIP File Format Specification, 6.3.x):
// end of central directory record (signature 0x06054b50), central directory headers (0x02014b50,
// time at +12, date at +14, name/extra/comment lengths at +28/+30/+32, local header offset at +42),
// local file headers (0x04034b50, time at +10, date at +12).

/** MS-DOS date and time words (2-second resolution, local fields, years 1980–2107). */
export function dosDateTime(iso: string): { date: number; time: number } {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) throw new RangeError(`not a date: ${iso}`);
  const year = Math.min(2107, Math.max(1980, d.getUTCFullYear()));
  return {
    date: ((year - 1980) << 9) | ((d.getUTCMonth() + 1) << 5) | d.getUTCDate(),
    time: (d.getUTCHours() << 11) | (d.getUTCMinutes() << 5) | Math.floor(d.getUTCSeconds() / 2),
  };
}

export function setZipEntryDates(zip: Buffer, iso: string): Buffer {
  const out = Buffer.from(zip);
  const { date, time } = dosDateTime(iso);
  // The end record is within the last 65,557 bytes (22 + the longest comment).
  let eocd = -1;
  for (let i = out.length - 22; i >= Math.max(0, out.length - 65557); i--) {
    if (out.readUInt32LE(i) === 0x06054b50) { eocd = i; break; }
  }
  if (eocd < 0) throw new Error('not a ZIP archive (no end of central directory record)');
  const entries = out.readUInt16LE(eocd + 10);
  let p = out.readUInt32LE(eocd + 16);
  for (let k = 0; k < entries; k++) {
    if (out.readUInt32LE(p) !== 0x02014b50) throw new Error('ZIP central directory is damaged');
    out.writeUInt16LE(time, p + 12);
    out.writeUInt16LE(date, p + 14);
    const local = out.readUInt32LE(p + 42);
    if (out.readUInt32LE(local) !== 0x04034b50) throw new Error('ZIP local header is damaged');
    out.writeUInt16LE(time, local + 10);
    out.writeUInt16LE(date, local + 12);
    p += 46 + out.readUInt16LE(p + 28) + out.readUInt16LE(p + 30) + out.readUInt16LE(p + 32);
  }
  return out;
}
