// Every number in the memo agrees with results.json (issue 5 §4): each number node of the
// document carries a source path, resolved here with a separate reader (memo-walk.ts), and equals
// the value there after the stated rounding; the rendered PDF (read back with poppler's
// pdftotext), DOCX (its XML), HTML and XLSX (read back with exceljs) print those same texts; the
// memo writes no digit of its own outside numbers from results.json; and no hidden count leaks.

import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Results } from '../../main/contract/results.ts';
import { figureData } from '../../main/report/figure-data.ts';
import type { Document } from '../../main/report/model/document.ts';
import { cellText, formatNumber, tables } from '../../main/report/model/format.ts';
import { METHOD_SOURCES } from '../../main/report/model/memo-appendix.ts';
import { buildMemo } from '../../main/report/model/memo.ts';
import { findingsOf } from '../../main/report/findings/index.ts';
import { renderMemoDocument } from '../../main/report/memo-files.ts';
import { readZip } from './zip-read.ts';
import { canRun } from './poppler.ts';
import { runFixture } from './memo-fixture.ts';
import { allStrings, resolveSource, walk, type Walked } from './memo-walk.ts';

const havePdftotext = canRun('pdftotext');
let results: Results;
let doc: Document;
let walked: Walked;
let files: Map<string, Buffer | string>;
let pdfText = '';
let dir: string;

beforeAll(async () => {
  const run = await runFixture();
  // Through JSON, as a reader of results.json sees it.
  results = JSON.parse(JSON.stringify(run.results));
  doc = buildMemo(results, figureData(run), { createdAt: '2025-03-12T09:30:00Z' });
  walked = walk(doc);
  const out = await renderMemoDocument(doc, ['pdf', 'html', 'docx', 'xlsx']);
  files = new Map(out.map((f) => [f.name, f.content as Buffer | string]));
  dir = mkdtempSync(join(tmpdir(), 'fenceline-memo-numbers-'));
  writeFileSync(join(dir, 'memo.pdf'), files.get('memo.pdf')!);
  if (havePdftotext) pdfText = execFileSync('/usr/bin/pdftotext', [join(dir, 'memo.pdf'), '-'], { encoding: 'utf8' });
}, 60_000);

/** Numbers whose value or printed text differs from results.json, or that have no source. */
function mismatches(w: Walked, res: Results): string[] {
  const out: string[] = [];
  for (const n of w.numbers) {
    if (!n.source) { out.push(`${n.where}: no source`); continue; }
    const want = resolveSource(res, n.source);
    const close = Math.abs(n.value - want) <= 1e-12 * Math.max(1, Math.abs(want));
    if (!close || formatNumber(n.value, n.format) !== formatNumber(want, n.format)) out.push(`${n.where} (${n.source}): ${n.value} ≠ ${want}`);
  }
  return out;
}

const squash = (s: string) => s.replace(/\s+/g, ' ');
const unescape = (s: string) => s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');

describe('the memo document', () => {
  it('has the nine sections of issue 5 and a glossary, in order', () => {
    expect(doc.sections.map((s) => s.id)).toEqual(['key-finding', 'rule', 'data', 'who', 'results', 'checks', 'limits', 'cautions', 'appendix', 'glossary']);
  });
  it('gives every number a source in results.json and prints the value found there', () => {
    expect(walked.numbers.length).toBeGreaterThan(100);
    expect(mismatches(walked, results)).toEqual([]);
  });
  it('(the check above catches a number that differs from results.json, or has no source)', () => {
    const bad: Document = JSON.parse(JSON.stringify(doc));
    const kf = bad.sections[0]!.blocks[0]!;
    if (kf.kind !== 'keyFinding' || kf.body[0]!.kind !== 'paragraph') throw new Error('unexpected key finding');
    const run = kf.body[0]!.runs.find((r) => r.kind === 'number')!;
    if (run.kind === 'number') run.value += 1;
    const other = bad.sections[3]!.blocks.find((b) => b.kind === 'paragraph')!;
    if (other.kind === 'paragraph') other.runs.push({ kind: 'number', value: 7, format: { style: 'integer' } });
    expect(mismatches(walk(bad), results).length).toBe(2);
  });
  it('quotes the headline estimate and interval in the key finding, in the outcome’s unit', () => {
    const k = 1;
    const b = results.outcomes[0]!.byDelta[k]!;
    const kf = doc.sections[0]!.blocks[0]!;
    expect(kf.kind).toBe('keyFinding');
    const text = JSON.stringify(kf);
    expect(text).toContain(`"source":"outcomes[0].byDelta[${k}].ci[0]"`);
    // The fixture's headline interval covers zero.
    expect(b.ci![0] < 0 && b.ci![1] > 0).toBe(true);
    expect(text).toContain('consistent with no effect');
    const words = walk({ ...doc, sections: [doc.sections[0]!] }).texts.map((t) => t.text).join(' ');
    expect(words).toContain('consistent with no effect');
    expect(words).not.toMatch(/2SLS|instrument|APS|complier|delta|propensity|estimand|standard error/i);
  });
  it('words the interval the way it words the effect: signed when it covers zero, as sizes of the same fall otherwise', () => {
    const kfText = (r: Results) => {
      const d = buildMemo(r, { boundaryMap: null, boundaryMapNote: null, signedDistance: null, density: [], balanceAll: [] }, { createdAt: '2025-03-12T09:30:00Z' });
      return JSON.stringify(d.sections[0]!.blocks[0]!);
    };
    // as run (covers zero): both ends carry their sign
    const runsWith = (json: string, source: string): Array<{ format?: { signed?: boolean } }> => {
      const found: Array<{ format?: { signed?: boolean } }> = [];
      const visit = (v: unknown): void => {
        if (Array.isArray(v)) v.forEach(visit);
        else if (v && typeof v === 'object') {
          if ((v as { source?: unknown }).source === source) found.push(v as { format?: { signed?: boolean } });
          Object.values(v).forEach(visit);
        }
      };
      visit(JSON.parse(json));
      return found;
    };
    const asRun = kfText(results);
    for (const end of [0, 1]) expect(runsWith(asRun, `outcomes[0].byDelta[1].ci[${end}]`).map((r) => r.format?.signed)).toEqual([true]);
    // the same results with the interval moved below zero: "lowered by" the sizes, smaller first
    const lower = structuredClone(results);
    const b = lower.outcomes[0]!.byDelta[1]!;
    b.estimate = -30; b.ci = [-50, -10]; b.arCi = [[-60, -5]]; b.tfCi = [-55, -8];
    lower.findings = findingsOf(lower).findings;
    const t = kfText(lower);
    expect(t).toContain('(95% interval: lowered by ');
    expect(t.indexOf('"source":"abs(outcomes[0].byDelta[1].ci[1])"')).toBeLessThan(t.indexOf('"source":"abs(outcomes[0].byDelta[1].ci[0])"'));
  });
  it('writes no digit of its own: every digit in its text is part of a string from results.json', () => {
    const strings = [...allStrings(results)].filter((s) => /\d/.test(s));
    const variants = strings.flatMap((s) => [s, s.replace(/^its /, ''), s.charAt(0).toUpperCase() + s.slice(1)]).sort((a, b) => b.length - a.length);
    const allowed = [/95%/g, /\b(19|20)\d\d\b/g, /≤\d+/g, /results\.json/g, /SHA-256/g, /HC1|CR1|2SLS/g];
    for (const { text, section } of walked.texts) {
      if (section === 'appendix-method') continue; // formulas and references (METHOD_SOURCES), checked below
      let rest = text;
      for (const s of variants) if (rest.includes(s)) rest = rest.split(s).join('');
      for (const a of allowed) rest = rest.replace(a, '');
      expect(rest, `"${text}" in section ${section}`).not.toMatch(/\d/);
    }
    expect(METHOD_SOURCES.length).toBeGreaterThan(5);
  });
});

describe('the rendered files print the same numbers', () => {
  it('HTML: every number run and number cell, as formatted', () => {
    const html = unescape(String(files.get('memo.html')).replace(/<[^>]+>/g, ''));
    for (const n of walked.numbers) expect(html, n.where).toContain(formatNumber(n.value, n.format));
    for (const t of tables(doc)) {
      const part = String(files.get('memo.html')).split(`<table id="${t.id}">`)[1]!.split('</table>')[0]!;
      const rows = part.split('<tbody>')[1]!.split('<tr').slice(1).map((r) => [...r.matchAll(/<t[dh][^>]*>(.*?)<\/t[dh]>/g)].map((m) => unescape(m[1]!.replace(/<[^>]+>/g, ''))));
      t.rows.forEach((row, i) => row.cells.forEach((c, j) => expect(rows[i]![j], `${t.id} ${i} ${j}`).toBe(cellText(c, t.columns[j]!, doc.suppression))));
    }
  });
  it.runIf(havePdftotext)('PDF: every number run, as formatted', () => {
    const text = squash(pdfText);
    for (const n of walked.numbers.filter((x) => !x.where.includes(' row '))) expect(text, n.where).toContain(formatNumber(n.value, n.format));
  });
  it('says which files hold unit-level data and are not for sharing', () => {
    const all = walked.texts.map((x) => x.text).join(' ');
    expect(all).toMatch(/results\.json, units\.csv and the app’s Evidence screen hold unit-level data/);
    expect(all).not.toMatch(/results\.json[^.]*(safe|may be shared|can be shared)/i);
  });
  it('DOCX: every number run and cell, as formatted', () => {
    const xml = readZip(files.get('memo.docx') as Buffer).get('word/document.xml')!.toString('utf8');
    const paras = xml.split('</w:p>').map((p) => unescape([...p.matchAll(/<w:t[^>]*>([^<]*)<\/w:t>/g)].map((m) => m[1]).join('')));
    const all = paras.join('\n');
    for (const n of walked.numbers) expect(all, n.where).toContain(formatNumber(n.value, n.format));
  });
  it('XLSX: one sheet per table, number cells hold the results’ values', async () => {
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(files.get('tables.xlsx') as unknown as ArrayBuffer);
    const list = tables(doc);
    expect(wb.worksheets.length).toBe(1 + list.length);
    list.forEach((t, ti) => {
      const ws = wb.worksheets[ti + 1]!;
      t.rows.forEach((row, r) => row.cells.forEach((c, j) => {
        const v = ws.getCell(4 + r, j + 1).value;
        if (c.kind === 'number') expect(v, `${t.id} ${r} ${j}`).toBe(resolveSource(results, c.source!));
        if (c.kind === 'suppressed') expect(v).toBe(cellText(c, t.columns[j]!, doc.suppression));
      }));
    });
  });
});

describe('small cells', () => {
  it('hides the small exclusion counts and withholds rows read, which would give their total away', () => {
    const rows = tables(doc).find((t) => t.id === 'rows')!;
    const cells = rows.rows.map((r) => r.cells[1]!);
    expect(results.study.rowsExcluded.map((e) => e.count)).toEqual([2, 1]);
    expect(cells.map((c) => c.kind)).toEqual(['suppressed', 'suppressed', 'suppressed', 'number']);
    expect(cells[3]).toMatchObject({ kind: 'number', value: results.study.rowsUsed });
  });
  it('no format prints rows read (from which the hidden exclusions follow)', async () => {
    const read = results.study.rowsRead;
    const forms = [formatNumber(read, { style: 'integer' }), String(read)];
    const html = String(files.get('memo.html')).replace(/data:image\/png;base64,[^"]+/g, '');
    const docx = readZip(files.get('memo.docx') as Buffer).get('word/document.xml')!.toString('utf8');
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(files.get('tables.xlsx') as unknown as ArrayBuffer);
    const cellsText = wb.worksheets.flatMap((ws) => { const out: string[] = []; ws.eachRow((row) => row.eachCell((c) => out.push(String(c.value)))); return out; }).join('\n');
    for (const f of forms) {
      expect(html).not.toContain(f);
      expect(docx).not.toContain(f);
      expect(cellsText).not.toContain(f);
      if (havePdftotext) expect(pdfText).not.toContain(f);
    }
    // …while the hidden exclusion rows show the mark in each format.
    expect(html).toMatch(/Excluded: [^<]*\(INCOME\) is not a number<\/th><td class="num suppressed"[^>]*>≤10</);
    if (havePdftotext) expect(execFileSync('/usr/bin/pdftotext', ['-layout', join(dir, 'memo.pdf'), '-'], { encoding: 'utf8' })).toMatch(/Excluded: [^\n]*\(INCOME\) is blank\s+≤10/);
    expect(cellsText).toContain('≤10');
  });
});
