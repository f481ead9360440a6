// The examples of RFC 4180 ("Common Format and MIME Type for CSV Files", Shafranovich 2005),
// §2 rules 1–7, each read through readTable. The importer needs a header row, so where an
// example has none, a header line "h1,h2,h3" is put above it (rule 3 makes the header optional).

import { describe, expect, it } from 'vitest';
import { CellKind, type RawTable } from '../../main/data/types.ts';
import { mustRead, mustRefuse, tempDir, uniqueName, writeFile } from './helpers.ts';

const dir = tempDir();
const CRLF = '\r\n';

async function csv(text: string): Promise<RawTable> {
  return mustRead(writeFile(dir, uniqueName('.csv'), text));
}

const texts = (t: RawTable, row: number) => t.columns.map((c) => c.texts?.[row]);

describe('RFC 4180 §2', () => {
  it('rule 1: each record on its own line, ended by CRLF', async () => {
    const t = await csv(`h1,h2,h3${CRLF}aaa,bbb,ccc${CRLF}zzz,yyy,xxx${CRLF}`);
    expect(t.rowCount).toBe(2);
    expect(texts(t, 0)).toEqual(['aaa', 'bbb', 'ccc']);
    expect(texts(t, 1)).toEqual(['zzz', 'yyy', 'xxx']);
  });

  it('rule 2: the last record may lack the line break', async () => {
    const t = await csv(`h1,h2,h3${CRLF}aaa,bbb,ccc${CRLF}zzz,yyy,xxx`);
    expect(t.rowCount).toBe(2);
    expect(texts(t, 1)).toEqual(['zzz', 'yyy', 'xxx']);
  });

  it('rule 3: an optional header line with the field names', async () => {
    const t = await csv(`field_name,field_name2,field_name3${CRLF}aaa,bbb,ccc${CRLF}zzz,yyy,xxx${CRLF}`);
    expect(t.headerRow).toBe(1);
    expect(t.columns.map((c) => c.name)).toEqual(['field_name', 'field_name2', 'field_name3']);
    expect([...t.rowNumbers]).toEqual([2, 3]);
  });

  it('rule 4: fields separated by commas; spaces are part of a field', async () => {
    const t = await csv(`h1,h2,h3${CRLF}aaa, bbb ,ccc${CRLF}`);
    expect(texts(t, 0)).toEqual(['aaa', ' bbb ', 'ccc']);
  });

  it('rule 5: fields may be enclosed in double quotes', async () => {
    const t = await csv(`h1,h2,h3${CRLF}"aaa","bbb","ccc"${CRLF}zzz,yyy,xxx`);
    expect(texts(t, 0)).toEqual(['aaa', 'bbb', 'ccc']);
    expect(texts(t, 1)).toEqual(['zzz', 'yyy', 'xxx']);
  });

  it('rule 6: quoted fields may hold line breaks, quotes and commas', async () => {
    const t = await csv(`h1,h2,h3${CRLF}"aaa","b${CRLF}bb","ccc"${CRLF}zzz,"y,y",xxx${CRLF}`);
    expect(texts(t, 0)).toEqual(['aaa', `b${CRLF}bb`, 'ccc']);
    expect(texts(t, 1)).toEqual(['zzz', 'y,y', 'xxx']);
    // A record spanning two lines is one spreadsheet row: rows 2 and 3, as Excel shows them.
    expect([...t.rowNumbers]).toEqual([2, 3]);
  });

  it('rule 7: a quote inside a quoted field is written twice', async () => {
    const t = await csv(`h1,h2,h3${CRLF}"aaa","b""bb","ccc"${CRLF}`);
    expect(texts(t, 0)).toEqual(['aaa', 'b"bb', 'ccc']);
  });
});

describe('beyond RFC 4180: what agency files do', () => {
  it('reads LF line ends and a UTF-8 byte-order mark', async () => {
    const t = await csv('\uFEFFID,INCOME\nA1,100\nA2,"1,200"\n');
    expect(t.columns[0]!.name).toBe('ID');
    expect([...t.columns[1]!.numbers]).toEqual([100, 1200]);
    expect([...t.columns[1]!.kinds]).toEqual([CellKind.Number, CellKind.TextNumber]);
    expect(t.notes.some((n) => n.code === 'text-numbers' && n.message.includes('1 number'))).toBe(true);
  });

  it('reads semicolon- and tab-separated files with a note', async () => {
    const t = await csv('ID;INCOME\nA1;100\n');
    expect(t.columns.map((c) => c.name)).toEqual(['ID', 'INCOME']);
    expect(t.notes.some((n) => n.code === 'delimiter')).toBe(true);
    const tab = await mustRead(writeFile(dir, uniqueName('.txt'), 'ID\tINCOME\nA1\t100\n'));
    expect([...tab.columns[1]!.numbers]).toEqual([100]);
  });

  it('reads non-UTF-8 (Windows Latin-1) text with a note', async () => {
    const bytes = Buffer.concat([Buffer.from('ID,NAME\n1,'), Buffer.from([0x4a, 0xf6, 0x72, 0x67]), Buffer.from('\n')]);
    const t = await mustRead(writeFile(dir, uniqueName('.csv'), bytes));
    expect(t.columns[1]!.texts?.[0]).toBe('Jörg');
    expect(t.notes.some((n) => n.code === 'encoding')).toBe(true);
  });

  it('keeps UTF-8 characters split across read chunks', async () => {
    const filler = 'x'.repeat(65_535);
    const t = await csv(`ID,NAME\n1,${filler}é\n`);
    expect(t.columns[1]!.texts?.[0]?.endsWith('é')).toBe(true);
    expect(t.notes.some((n) => n.code === 'encoding')).toBe(false);
  });

  it('refuses an unclosed quote, naming the line', async () => {
    const p = await mustRefuse(writeFile(dir, uniqueName('.csv'), 'ID,NAME\n1,"open\n2,b\n'));
    expect(p.message).toMatch(/never closed/);
    expect(p.message).toMatch(/line \d+/);
  });

  it('keeps a stray quote in an unquoted field as a character (lenient where rule 5 is strict)', async () => {
    const t = await csv('ID,NAME\n1,5" pipe\n2,"a"b\n');
    expect(texts(t, 0)[1]).toBe('5" pipe');
    expect(texts(t, 1)[1]).toBe('"a"b');
  });
});
