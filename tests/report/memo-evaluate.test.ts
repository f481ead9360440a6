// The whole evaluate with memo formats (docs/cli.md): memo.pdf, memo.html, memo.docx and
// tables.xlsx written beside results.json and units.csv, all renamed into place together, with
// progress stage 'memo'. Outside checks: poppler's pdfinfo/pdftoppm read the PDF (page count,
// a page that is not blank), a separate ZIP reader opens the DOCX, exceljs opens the workbook.

import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { describe, expect, it } from 'vitest';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import { AVAILABLE_MEMO_FORMATS } from '../../main/report/memo-names.ts';
import type { ProgressEvent } from '../../main/contract/api.ts';
import { readZip } from './zip-read.ts';
import { canRun } from './poppler.ts';
import { writeFixture } from './memo-fixture.ts';

describe('evaluate with memo formats', () => {
  it('writes the four memo files beside results.json, and reports the memo stage', async () => {
    expect([...AVAILABLE_MEMO_FORMATS].sort()).toEqual(['docx', 'html', 'pdf', 'xlsx']);
    const out = mkdtempSync(join(tmpdir(), 'fenceline-memo-out-'));
    const events: ProgressEvent[] = [];
    const r = await evaluateStudy({ studyPath: writeFixture(3000), outDir: out, formats: ['pdf', 'html', 'docx', 'xlsx'], workers: 0 }, { onProgress: (e) => events.push(e) });
    expect(r.ok, JSON.stringify(r)).toBe(true);
    expect(readdirSync(out).sort()).toEqual(['memo.docx', 'memo.html', 'memo.pdf', 'results.json', 'tables.xlsx', 'units.csv']);
    const memo = events.filter((e) => e.stage === 'memo');
    expect(memo.length).toBeGreaterThan(1);
    expect(memo.at(-1)!.done).toBe(memo.at(-1)!.total);

    const pdf = readFileSync(join(out, 'memo.pdf'));
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    if (canRun('pdfinfo')) {
      const pages = Number(/Pages:\s+(\d+)/.exec(execFileSync('/usr/bin/pdfinfo', [join(out, 'memo.pdf')], { encoding: 'utf8' }))![1]);
      expect(pages).toBeGreaterThanOrEqual(8);
      expect(pages).toBeLessThanOrEqual(40);
    }
    if (canRun('pdftoppm')) {
      const pgm = execFileSync('/usr/bin/pdftoppm', ['-r', '20', '-gray', '-f', '1', '-l', '1', join(out, 'memo.pdf')]);
      const header = pgm.subarray(0, 20).toString('latin1').split(/\s+/);
      const [w, h] = [Number(header[1]), Number(header[2])];
      const pixels = pgm.subarray(pgm.length - w * h);
      expect(pixels.filter((v) => v < 160).length / (w * h)).toBeGreaterThan(0.005);
    }
    const html = readFileSync(join(out, 'memo.html'), 'utf8');
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).not.toMatch(/https?:\/\//i);
    expect(html).toContain('Key finding');
    const docx = readZip(readFileSync(join(out, 'memo.docx')));
    expect(docx.get('word/document.xml')!.toString('utf8')).toContain('Limits and caveats');
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(readFileSync(join(out, 'tables.xlsx')) as unknown as ArrayBuffer);
    expect(wb.worksheets[0]!.name).toBe('About');
    expect(wb.worksheets.map((w) => w.name)).toContain('Effect');
    // results.json is what the memo was built from: its title is the memo's.
    const results = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8'));
    expect(html).toContain(results.study.title);
  }, 90_000);
  it('with no formats writes only results.json and units.csv', async () => {
    const out = mkdtempSync(join(tmpdir(), 'fenceline-memo-out-'));
    const r = await evaluateStudy({ studyPath: writeFixture(1500), outDir: out, formats: [], workers: 0 });
    expect(r.ok).toBe(true);
    expect(readdirSync(out).sort()).toEqual(['results.json', 'units.csv']);
  }, 60_000);
});
