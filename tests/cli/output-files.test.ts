// The output writer (main/output/write-files.ts) and the input-clash check (input-clash.ts) with
// the file system's failures injected: a disk that fills in the middle of a file (ENOSPC), a
// folder without permission, a read-only disk. Every failure is a plain message and no `.part`
// file is left; outputs that would replace an input are named before anything is written.

import { mkdtempSync, readdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { inputClashes } from '../../main/output/input-clash.ts';
import { neutralizeText } from '../../main/output/cell-safety.ts';
import { OutputFolderError, writeFilesAtomically, writeOutputFiles } from '../../main/output/write-files.ts';

const tmp = () => mkdtempSync(join(tmpdir(), 'fenceline-out-'));
const files = [{ name: 'results.json', content: '{}' }, { name: 'units.csv', content: 'id\r\n' }, { name: 'memo.html', content: '<p>' }];
const errno = (code: string) => Object.assign(new Error(code), { code });

describe('writing the outputs', () => {
  it('writes every file, and no temporary file stays', () => {
    const dir = tmp();
    expect(writeOutputFiles(dir, files)).toEqual({ ok: true, value: files.map((f) => join(dir, f.name)) });
    expect(readdirSync(dir).sort()).toEqual(['memo.html', 'results.json', 'units.csv']);
  });
  it('a disk that fills half-way through the second file: a plain message, nothing written, no .part left', () => {
    const dir = tmp();
    let n = 0;
    const writeFile = (p: string, c: string | Uint8Array) => {
      if (++n === 2) { writeFileSync(p, String(c).slice(0, 1)); throw errno('ENOSPC'); } // part of it reached the disk
      writeFileSync(p, c);
    };
    const r = writeOutputFiles(dir, files, { writeFile });
    expect(r).toEqual({ ok: false, problems: [{ path: 'outDir', message: `The disk holding ${dir} is full; nothing was written. Free some space or choose another folder (--out).` }] });
    expect(readdirSync(dir)).toEqual([]);
  });
  it.each([['EACCES', /do not have permission/], ['EPERM', /do not have permission/], ['EROFS', /read-only disk/], ['EIO', /could not be written .*\(EIO\)/]])('%s is a message, not a fault', (code, message) => {
    const dir = tmp();
    const r = writeOutputFiles(dir, files, { writeFile: () => { throw errno(code); } });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0]!.message).toMatch(message);
    expect(readdirSync(dir)).toEqual([]);
  });
  it('a file where the folder should be', () => {
    const dir = tmp();
    writeFileSync(join(dir, 'f'), '');
    expect(() => writeFilesAtomically(join(dir, 'f'), files)).toThrow(OutputFolderError);
    expect(() => writeFilesAtomically(join(dir, 'f', 'g'), files)).toThrow(/is a file, not a folder/);
  });
  it('an internal fault (not a file-system error) is still thrown, and still cleans up', () => {
    const dir = tmp();
    expect(() => writeOutputFiles(dir, files, { writeFile: (p) => { writeFileSync(p, 'x'); throw new TypeError('bug'); } })).toThrow(TypeError);
    expect(readdirSync(dir)).toEqual([]);
  });
});

describe('outputs that would replace inputs', () => {
  it('names each clash, through symbolic links too', () => {
    const dir = tmp();
    writeFileSync(join(dir, 'units.csv'), 'data');
    const link = join(tmp(), 'linked');
    symlinkSync(dir, link);
    const p = inputClashes(link, ['results.json', 'units.csv'], [{ path: join(dir, 'units.csv'), role: 'the data file' }, { path: join(dir, 'study.json'), role: 'the study file' }]);
    expect(p).toHaveLength(1);
    expect(p[0]!.message).toMatch(/units\.csv would replace the data file .*units\.csv\. Nothing was written/);
    expect(inputClashes(tmp(), ['units.csv'], [{ path: join(dir, 'units.csv'), role: 'the data file' }])).toEqual([]);
  });
});

describe('formula injection (OWASP, "CSV Injection")', () => {
  it('prefixes a quote to text that begins like a formula, and leaves numbers', () => {
    expect(['=1+1', '+cmd|x', '-2+3', '@SUM(1)', '\tx', '\rx'].map(neutralizeText)).toEqual(["'=1+1", "'+cmd|x", "'-2+3", "'@SUM(1)", "'\tx", "'\rx"]);
    expect(['-5', '+3.5', '-1e-3', 'A-1', 'x=1', ''].map(neutralizeText)).toEqual(['-5', '+3.5', '-1e-3', 'A-1', 'x=1', '']);
  });
});
