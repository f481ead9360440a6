// The command line under the failures of the hardening review: outputs that would replace the
// study's inputs, output folders that cannot take the files (a file, read-only, a full disk),
// too many worker threads, and IDs a spreadsheet would take for formulas. Each is exit 2 with one
// plain message — never a stack trace (exit 1) — and no temporary `.part` file is left anywhere.

import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, renameSync, rmdirSync, writeFileSync } from 'node:fs';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { afterAll, describe, expect, it } from 'vitest';
import { singleFileStudy, writeSingleFileStudy } from '../serve/single-file-study.ts';

const ROOT = join(__dirname, '../..');
function cli(...args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(ROOT, 'main/cli.ts'), ...args], { cwd: ROOT, encoding: 'utf8', timeout: 180_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
const tmp = () => mkdtempSync(join(tmpdir(), 'fenceline-harden-cli-'));
const FAST = ['--formats', 'none', '--draws', '200', '--quiet'];

/** Every `.part` file under `dir`, however deep. */
function partsUnder(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, encoding: 'utf8' }).filter((n) => n.endsWith('.part'));
}

function expectPlainRefusal(r: ReturnType<typeof cli>, message: RegExp) {
  expect(r.code, r.stderr).toBe(2);
  expect(r.stderr).toMatch(message);
  expect(r.stderr).not.toMatch(/internal fault|\n\s+at /);
}

describe('outputs never replace inputs', () => {
  it('a study whose data file is units.csv, run with --out in its own folder, is refused and its data kept', () => {
    const dir = tmp();
    writeSingleFileStudy(dir, 300);
    renameSync(join(dir, 'applicants.csv'), join(dir, 'units.csv'));
    writeFileSync(join(dir, 'study.json'), JSON.stringify({ ...singleFileStudy(), data: { path: 'units.csv' } }));
    const before = readFileSync(join(dir, 'units.csv'), 'utf8');
    const r = cli('evaluate', join(dir, 'study.json'), '--out', dir, ...FAST);
    expectPlainRefusal(r, /units\.csv would replace the data file/);
    expect(readFileSync(join(dir, 'units.csv'), 'utf8')).toBe(before);
    expect(existsSync(join(dir, 'results.json'))).toBe(false);
  });
  it('a study named results.json in the output folder is not overwritten (letter case aside where the disk ignores it)', () => {
    const dir = tmp();
    writeSingleFileStudy(dir, 300);
    renameSync(join(dir, 'study.json'), join(dir, 'results.json'));
    const before = readFileSync(join(dir, 'results.json'), 'utf8');
    expectPlainRefusal(cli('evaluate', join(dir, 'results.json'), '--out', dir, ...FAST), /results\.json would replace the study file/);
    expect(readFileSync(join(dir, 'results.json'), 'utf8')).toBe(before);
  });
  it('nor is the workspace database', () => {
    const dir = tmp();
    const study = writeSingleFileStudy(dir, 300);
    writeFileSync(join(dir, 'units.csv.db'), '');
    expectPlainRefusal(cli('evaluate', study, '--out', join(dir, 'out'), '--workspace', join(dir, 'out', 'results.json'), ...FAST), /would replace the workspace database/);
  });
});

describe('output folders that cannot take the files', () => {
  it('a file given as the output folder', () => {
    const dir = tmp();
    const study = writeSingleFileStudy(dir, 300);
    writeFileSync(join(dir, 'taken'), 'a file');
    expectPlainRefusal(cli('evaluate', study, '--out', join(dir, 'taken'), ...FAST), /is a file, not a folder/);
    expectPlainRefusal(cli('evaluate', study, '--out', join(dir, 'taken', 'below'), ...FAST), /is a file, not a folder/);
  });

  // A tiny and a read-only tmpfs (root only, where mounting is allowed); the same failures are
  // simulated by injection in output-files.test.ts wherever mounting is not possible.
  const mounts: string[] = [];
  const mount = (options: string): string | null => {
    const at = mkdtempSync(join(tmpdir(), 'fenceline-mnt-'));
    const r = spawnSync('mount', ['-t', 'tmpfs', '-o', options, 'tmpfs', at]);
    if (r.status !== 0) { rmdirSync(at); return null; }
    mounts.push(at);
    return at;
  };
  afterAll(() => { for (const m of mounts) { spawnSync('umount', [m]); try { rmdirSync(m); } catch { /* kept */ } } });

  it('a full disk: exit 2, and no .part file left behind', (ctx) => {
    const tiny = mount('size=48k');
    if (!tiny) ctx.skip();
    const dir = tmp();
    const study = writeSingleFileStudy(dir, 1500);
    const r = cli('evaluate', study, '--out', join(tiny!, 'out'), ...FAST);
    expectPlainRefusal(r, /disk holding .* is full; nothing was written/);
    expect(partsUnder(tiny!)).toEqual([]);
  });
  it('a read-only disk: exit 2', (ctx) => {
    const ro = mount('ro,size=64k');
    if (!ro) ctx.skip();
    const dir = tmp();
    const study = writeSingleFileStudy(dir, 300);
    expectPlainRefusal(cli('evaluate', study, '--out', join(ro!, 'out'), ...FAST), /read-only disk/);
    expectPlainRefusal(cli('evaluate', study, '--out', ro!, ...FAST), /read-only disk/);
  });
});

describe('worker threads', () => {
  it('--workers beyond the cores is refused with the limit', () => {
    const dir = tmp();
    const study = writeSingleFileStudy(dir, 300);
    const r = cli('evaluate', study, '--out', join(dir, 'out'), ...FAST, '--workers', '100000');
    expectPlainRefusal(r, new RegExp(`--workers must be from 0 \\(no worker threads\\) to ${availableParallelism()}`));
    expectPlainRefusal(cli('evaluate', study, '--out', join(dir, 'out'), ...FAST, '--workers=-1'), /--workers must be from 0/);
  });
});

describe('spreadsheet formula injection (OWASP, "CSV Injection")', () => {
  it('IDs and labels that begin like a formula are written as text to units.csv and tables.xlsx', async () => {
    const dir = tmp();
    writeSingleFileStudy(dir, 600);
    const bad = ['=HYPERLINK("http://example.invalid","x")', '@SUM(1+1)', '+cmd|x', '-2+3', '\tTAB'];
    const lines = readFileSync(join(dir, 'applicants.csv'), 'utf8').trim().split('\r\n');
    const idAt = lines[0]!.split(',').indexOf('APPLICANT_ID');
    // Rows near the top whose ID is replaced; quoting per RFC 4180 for the comma and quotes.
    const field = (s: string) => (/[",\t]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
    const rows = lines.slice(1).map((l, i) => { const r = l.split(','); if (i < bad.length) r[idAt] = field(bad[i]!); else if (i === bad.length) r[idAt] = '-5'; return r.join(','); });
    writeFileSync(join(dir, 'applicants.csv'), [lines[0], ...rows].join('\r\n') + '\r\n');
    const s = singleFileStudy();
    writeFileSync(join(dir, 'study.json'), JSON.stringify({ ...s, columns: { ...s.columns, outcomes: [{ column: 'ARREARS_MARCH', label: '=1+1 arrears' }] } }));
    const out = join(dir, 'out');
    const r = cli('evaluate', join(dir, 'study.json'), '--out', out, '--formats', 'xlsx', '--draws', '200', '--quiet');
    expect(r.code, r.stderr).toBe(0);
    const ids = readFileSync(join(out, 'units.csv'), 'utf8').split('\r\n').slice(1).map((l) => l.startsWith('"') ? l.slice(1, l.indexOf('",')).replace(/""/g, '"') : l.split(',')[0]!);
    for (const b of bad) if (ids.some((i) => i.endsWith(b))) expect(ids, b).toContain(`'${b}`);
    for (const i of ids) expect(i, i).not.toMatch(/^[=+\-@\t\r](?![\d.]+$)/);
    if (ids.includes('-5') || ids.includes("'-5")) expect(ids).toContain('-5');
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(readFileSync(join(out, 'tables.xlsx')) as never);
    const texts: string[] = [];
    wb.eachSheet((ws) => ws.eachRow((row) => row.eachCell((c) => { if (typeof c.value === 'string') texts.push(c.value); })));
    expect(texts.some((t) => t.includes('=1+1 arrears'))).toBe(true);
    for (const t of texts) expect(t, t).not.toMatch(/^[=+@\t\r]/);
  }, 240_000);
});

it('leaves no .part file in the temporary folders it wrote to', () => {
  const leftovers = readdirSync(tmpdir()).filter((n) => n.startsWith('fenceline-harden-cli-')).flatMap((n) => partsUnder(join(tmpdir(), n)));
  expect(leftovers).toEqual([]);
  mkdirSync(join(tmpdir(), 'fenceline-harden-cli-probe'), { recursive: true });
});
