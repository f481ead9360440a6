// The four renderers on the invented sample document (sample-document.ts). Outside checks:
// pdftotext/pdftoppm (poppler) read the PDF back, a separate ZIP reader (zip-read.ts) opens DOCX
// and XLSX, exceljs reads the workbook back, and the Office Open XML names (w:tbl, w:tblHeader,
// w:pStyle "Heading1") come from ECMA-376 Part 1.

import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Document, Table } from '../../main/report/model/document.ts';
import { cellText, checkDocument, flattenSections, tables } from '../../main/report/model/format.ts';
import { renderDocx } from '../../main/report/render/docx.ts';
import { renderFigures } from '../../main/report/render/figures.ts';
import { renderHtml } from '../../main/report/render/html.ts';
import { renderPdf } from '../../main/report/render/pdf.ts';
import { renderXlsx, sheetNameFor } from '../../main/report/render/xlsx.ts';
import { dosDateTime } from '../../main/report/render/zip-dates.ts';
import { sampleDocument, type SampleDocument } from './sample-document.ts';
import { canRun } from './poppler.ts';
import { readZip, zipEntryDates } from './zip-read.ts';

const havePdftotext = canRun('pdftotext');
const havePdftoppm = canRun('pdftoppm');

let sample: SampleDocument;
let doc: Document;
let pdf: Buffer;
let html: string;
let docx: Buffer;
let xlsx: Buffer;
let dir: string;
let figures: Map<string, Buffer>;

beforeAll(async () => {
  sample = sampleDocument();
  doc = sample.doc;
  figures = await renderFigures(doc, { width: 600, height: 350, scale: 1.5 });
  const opts = { figures };
  [pdf, html, docx, xlsx] = await Promise.all([renderPdf(doc, opts), renderHtml(doc, opts), renderDocx(doc, opts), renderXlsx(doc, opts)]);
  dir = mkdtempSync(join(tmpdir(), 'fenceline-memo-'));
  writeFileSync(join(dir, 'memo.pdf'), pdf);
}, 60_000);

const mark = (reason: 'small' | 'derived') => (reason === 'small' ? doc.suppression.smallMark : doc.suppression.derivedMark);
const table = (id: string): Table => tables(doc).find((t) => t.id === id)!;
const unescape = (s: string) => s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');

describe('the sample document', () => {
  it('is well formed, has a long table, hidden cells and at least two figures', () => {
    expect(checkDocument(doc)).toEqual([]);
    expect(table('units-by-office').rows.length).toBeGreaterThanOrEqual(80);
    expect(sample.hiddenCells.get('units-by-office')!.length).toBeGreaterThan(5);
    expect(sample.hiddenCells.get('units-by-office')!.some((h) => h.value > 10)).toBe(true); // secondary
    expect(figures.size).toBeGreaterThanOrEqual(2);
    // Plain JSON: survives a round trip unchanged.
    expect(JSON.parse(JSON.stringify(doc))).toEqual(doc);
  });
  it('renderers refuse a malformed document with the list of problems', async () => {
    const bad: Document = JSON.parse(JSON.stringify(doc));
    bad.sections[1]!.id = bad.sections[0]!.id;
    await expect(renderHtml(bad, { figures })).rejects.toThrow(/used twice/);
  });
});

describe('PDF', () => {
  it('embeds fonts and takes its dates from the document', () => {
    const text = pdf.toString('latin1');
    expect(text).toMatch(/\/FontFile2/); // embedded TrueType (ISO 32000-1, §9.9)
    expect(text).not.toMatch(/\/BaseFont \/Helvetica/);
    expect(text).toContain('D:20250312093000Z');
  });
  it.runIf(havePdftotext)('has several pages, "page X of Y" footers, and repeats the long table\'s header', () => {
    const out = execFileSync('/usr/bin/pdftotext', ['-layout', join(dir, 'memo.pdf'), '-'], { encoding: 'utf8' });
    const pages = out.split('\f').filter((p) => p.trim().length > 0);
    expect(pages.length).toBeGreaterThan(1);
    pages.forEach((p, i) => expect(p).toContain(`Page ${i + 1} of ${pages.length}`));
    const withHeader = pages.filter((p) => /Office\s+1 person\s+2 people\s+3 or more\s+All sizes/.test(p));
    expect(withHeader.length).toBeGreaterThanOrEqual(2);
    expect(out).toMatch(/Table 2 \(continued\)/);
    expect(out).toContain('Key finding');
    expect(out).toContain('-35.2 USD');
  });
  it.runIf(havePdftotext)('never prints a hidden count in its cell', () => {
    const out = execFileSync('/usr/bin/pdftotext', ['-layout', join(dir, 'memo.pdf'), '-'], { encoding: 'utf8' });
    const lines = out.split('\n');
    let checked = 0;
    for (const [id, hidden] of sample.hiddenCells) {
      const t = table(id);
      for (const h of hidden) {
        const first = t.rows[h.row]!.cells[0]!;
        const label = first.kind === 'text' ? first.text : '';
        const line = lines.find((l) => l.trim().startsWith(label + ' '))!;
        const tokens = line.trim().split(/\s{2,}/);
        const cell = t.rows[h.row]!.cells[h.column]!;
        expect(cell.kind).toBe('suppressed');
        expect(tokens[h.column]).toBe(mark((cell as { reason: 'small' | 'derived' }).reason));
        expect(tokens[h.column]).not.toBe(String(h.value));
        checked++;
      }
    }
    expect(checked).toBe(sample.hiddenCounts.length - 1); // all hidden cells (the last hidden count is in running text)
    expect(out).toMatch(/all but ≤10 households/);
  });
  it.runIf(havePdftoppm)('pages rendered by pdftoppm are not blank', () => {
    // PGM (netpbm P5) of page 1 at 20 dpi, gray.
    const pgm = execFileSync('/usr/bin/pdftoppm', ['-r', '20', '-gray', '-f', '1', '-l', '1', join(dir, 'memo.pdf')]);
    const header = pgm.subarray(0, 20).toString('latin1').split(/\s+/);
    const [w, h] = [Number(header[1]), Number(header[2])];
    const pixels = pgm.subarray(pgm.length - w * h);
    const dark = pixels.filter((v) => v < 160).length;
    expect(dark / (w * h)).toBeGreaterThan(0.005);
  });
  it('is the same bytes for the same document', async () => {
    expect((await renderPdf(doc, { figures })).equals(pdf)).toBe(true);
  });
  it.runIf(canRun('pdfinfo'))('is a tagged PDF with a language, a displayed title and a structure tree (ISO 32000-1 §14.8)', () => {
    const info = execFileSync('/usr/bin/pdfinfo', [join(dir, 'memo.pdf')], { encoding: 'utf8' });
    expect(info).toMatch(/Tagged:\s+yes/);
    expect(info.split('\n').find((x) => x.startsWith('Title:'))!.replace(/^Title:\s+/, '')).toBe(doc.title.title);
    const raw = pdf.toString('latin1');
    expect(raw).toMatch(/\/StructTreeRoot/);
    expect(raw).toMatch(/\/MarkInfo/);
    expect(raw).toMatch(/\/Lang \(en\)/);
    expect(raw).toMatch(/\/DisplayDocTitle true/);
    for (const type of ['Document', 'Sect', 'H1', 'H2', 'P', 'L', 'LI', 'Table', 'TR', 'TH', 'TD', 'Figure']) expect(raw, type).toMatch(new RegExp(`/S /${type}\\b`));
    // Every figure's alternative text is in the structure tree.
    const fig = doc.sections.flatMap(function all(s): Array<{ kind: string; alt?: string }> { return [...s.blocks, ...(s.sections ?? []).flatMap(all)]; }).find((b) => b.kind === 'figure')!;
    expect(raw).toContain(`/Alt (${fig.alt!.slice(0, 20)}`);
  });
  it.runIf(havePdftotext)('splits no table header inside a word and wraps no number, even in a table too wide for the page', async () => {
    const headers = ['Limit', 'Change', 'Switching', 'Outside', 'Receiving', 'Total (USD)', 'From', 'To', 'Supported', 'Adjusted p-value'];
    const wide: Table = {
      kind: 'table', id: 'wide', caption: 'A table wider than the page',
      columns: headers.map((h, i) => ({ header: h, align: i === 0 ? 'left' : 'right', ...(i === 0 ? { width: 0.6 } : {}) })),
      rows: Array.from({ length: 6 }, (_, r) => ({ cells: headers.map((_, i) => (i === 0
        ? { kind: 'text' as const, text: `Limit on income for households of size ${r + 1} in the northern district` }
        : { kind: 'number' as const, value: -14199.35 * (r + 1) * i, format: { style: 'decimal' as const, decimals: 2 } })) })),
    };
    const d: Document = { ...doc, sections: [{ id: 'w', heading: 'Wide', blocks: [wide] }] };
    const wdir = mkdtempSync(join(tmpdir(), 'fenceline-wide-'));
    writeFileSync(join(wdir, 'memo.pdf'), await renderPdf(d, { figures: new Map() }));
    const out = execFileSync('/usr/bin/pdftotext', [join(wdir, 'memo.pdf'), '-'], { encoding: 'utf8' });
    const tokens = new Set(out.split(/\s+/));
    for (const h of headers) for (const w of h.split(' ')) expect(tokens.has(w), `header word "${w}"`).toBe(true);
    for (const row of wide.rows) row.cells.forEach((c, j) => { if (c.kind === 'number') expect(tokens.has(cellText(c, wide.columns[j]!, d.suppression)), `number in column ${j}`).toBe(true); });
  });
  it.runIf(havePdftotext)('never leaves a heading alone at the foot of a page', () => {
    const out = execFileSync('/usr/bin/pdftotext', [join(dir, 'memo.pdf'), '-'], { encoding: 'utf8' });
    const headings = new Set(flattenSections(doc).map(({ section }) => section.heading));
    out.split('\f').forEach((page, i) => {
      const lines = page.split('\n').map((x) => x.trim()).filter((x) => x && !/^Page \d+ of \d+$/.test(x) && x !== doc.title.title);
      expect(headings.has(lines.at(-1) ?? ''), `page ${i + 1} ends with the heading "${lines.at(-1)}"`).toBe(false);
    });
  });
});

describe('DOCX', () => {
  let files: Map<string, Buffer>;
  let xml: string;
  beforeAll(() => {
    files = readZip(docx);
    xml = files.get('word/document.xml')!.toString('utf8');
  });
  it('is an Office Open XML package', () => {
    expect(docx.subarray(0, 2).toString('latin1')).toBe('PK');
    expect(files.has('[Content_Types].xml')).toBe(true);
    expect(files.has('word/document.xml')).toBe(true);
  });
  it('uses real heading styles and real tables with repeating header rows', () => {
    for (const s of doc.sections) expect(xml).toMatch(new RegExp(`<w:pStyle w:val="Heading1"/>.*?<w:t[^>]*>${s.heading}</w:t>`));
    expect(xml).toMatch(/<w:pStyle w:val="Heading2"\/>.*?<w:t[^>]*>Offer probabilities<\/w:t>/);
    expect(xml).toContain('<w:tbl>');
    expect(xml).toContain('<w:tblHeader/>');
    expect(files.get('word/footnotes.xml')!.toString('utf8')).toContain('A 95% interval');
    expect([...files.keys()].filter((k) => k.startsWith('word/media/')).length).toBe(figures.size);
    expect(xml).toContain('descr="A map with income');
  });
  it('never prints a hidden count in its cell', () => {
    const tbls = xml.split('<w:tbl>').slice(1);
    const office = tbls.find((t) => t.includes('>3 or more<'))!;
    const rows = office.split('<w:tr>').slice(1).map((r) => r.split('<w:tc>').slice(1).map((c) => unescape([...c.matchAll(/<w:t[^>]*>([^<]*)<\/w:t>/g)].map((m) => m[1]).join(''))));
    for (const h of sample.hiddenCells.get('units-by-office')!) {
      const txt = rows[h.row + 1]![h.column]!; // row 0 is the header
      expect(txt).not.toBe(String(h.value));
      expect([doc.suppression.smallMark, doc.suppression.derivedMark]).toContain(txt);
    }
  });
  it('has fixed dates (core properties and ZIP entries)', async () => {
    expect(files.get('docProps/core.xml')!.toString('utf8')).toContain('<dcterms:created xsi:type="dcterms:W3CDTF">2025-03-12T09:30:00Z</dcterms:created>');
    const want = dosDateTime(doc.title.createdAt);
    expect(zipEntryDates(docx).every((d) => d.date === want.date && d.time === want.time)).toBe(true);
    expect((await renderDocx(doc, { figures })).equals(docx)).toBe(true);
  });
});

describe('HTML', () => {
  it('puts every table in a labelled box that scrolls sideways on a narrow screen (WCAG 2.1, 1.4.10)', () => {
    const n = tables(doc).length;
    expect([...html.matchAll(/<div class="table-wrap" role="region" tabindex="0" aria-label="[^"]+"><table id=/g)].length).toBe(n);
    expect(html).toMatch(/\.table-wrap \{[^}]*overflow-x: auto/);
    expect(html).toMatch(/@media \(max-width: [\d.]+rem\)/);
  });
  it('is one self-contained file: no network references, no scripts, images as data: URIs', () => {
    const refs = [...html.matchAll(/\b(?:src|href)\s*=\s*["']([^"']*)["']/gi)].map((m) => m[1]!);
    expect(refs.length).toBeGreaterThan(0);
    for (const r of refs) expect(r).toMatch(/^(data:image\/png;base64,|#)/);
    expect(html).not.toMatch(/https?:\/\//i);
    expect(html).not.toMatch(/<script|<link|@import|url\(/i);
    const imgs = [...html.matchAll(/<img [^>]*src="([^"]+)"/g)].map((m) => m[1]!);
    expect(imgs.length).toBe(figures.size);
    expect(html).toContain('@media print');
    expect(html).toContain('thead { display: table-header-group; }');
  });
  it('never prints a hidden count in its cell', () => {
    for (const [id, hidden] of sample.hiddenCells) {
      const part = html.split(`<table id="${id}">`)[1]!.split('</table>')[0]!;
      const body = part.split('<tbody>')[1]!;
      const rows = body.split('<tr').slice(1).map((r) => [...r.matchAll(/<t[dh][^>]*>(.*?)<\/t[dh]>/g)].map((m) => unescape(m[1]!.replace(/<[^>]+>/g, ''))));
      for (const h of hidden) {
        const txt = rows[h.row]![h.column]!;
        expect(txt).not.toBe(String(h.value));
        expect([doc.suppression.smallMark, doc.suppression.derivedMark]).toContain(txt);
      }
    }
    expect(html).toContain('all but <span class="suppressed" title="hidden small count">≤10</span> households');
  });
});

describe('XLSX', () => {
  let wb: ExcelJS.Workbook;
  beforeAll(async () => {
    wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx as unknown as ArrayBuffer);
  });
  it('has an About sheet with provenance, then one sheet per table', () => {
    const names = wb.worksheets.map((w) => w.name);
    expect(names[0]).toBe('About');
    expect(names.length).toBe(1 + tables(doc).length);
    const about = wb.getWorksheet('About')!;
    const text = about.getColumn(1).values.map(String).join('\n');
    for (const p of doc.title.provenance) expect(text).toContain(p);
    expect(text).toContain(doc.suppression.smallLegend);
  });
  it('stores numbers as numbers with the memo\'s format, and hidden counts only as their mark', () => {
    const t = table('units-by-office');
    const ws = wb.getWorksheet('By office')!;
    expect(ws.getCell(3, 2).value).toBe('1 person');
    t.rows.forEach((row, r) => row.cells.forEach((cell, c) => {
      const x = ws.getCell(4 + r, c + 1);
      if (cell.kind === 'number') {
        expect(x.value).toBe(cell.value);
        expect(x.numFmt).toBe('#,##0');
      } else if (cell.kind === 'suppressed') {
        expect(x.value).toBe(cellText(cell, t.columns[c]!, doc.suppression));
      }
    }));
    for (const h of sample.hiddenCells.get('units-by-office')!) expect(ws.getCell(4 + h.row, 1 + h.column).value).not.toBe(h.value);
    const est = wb.getWorksheet('Estimates')!;
    expect(est.getCell(4, 3).value).toBe(-41.8);
    expect(est.getCell(4, 3).numFmt).toBe('+#,##0.0;-#,##0.0;#,##0.0');
  });
  it('has fixed dates', async () => {
    expect(wb.created?.toISOString()).toBe('2025-03-12T09:30:00.000Z');
    expect((await renderXlsx(doc)).equals(xlsx)).toBe(true);
  });
  it('makes valid, unique sheet names', () => {
    const taken = new Set<string>();
    expect(sheetNameFor('Rows read: used / excluded [all] and a very long tail', taken)).toBe('Rows read used excluded all and');
    expect(sheetNameFor('Rows read: used / excluded [all] and a very long tail', taken)).toBe('Rows read used excluded all (2)');
  });
});
