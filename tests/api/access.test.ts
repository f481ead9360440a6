// Capabilities, not paths (main/api/access.ts): with the app's allow-list in the context (browser
// mode and Electron), every api method that touches the disk refuses what the user did not pick
// and the workspace does not hold — the probes an attacker holding the token, or a compromised
// renderer, would try. Without an allow-list (the CLI) paths are used as typed.

import { mkdirSync, mkdtempSync, readFileSync, symlinkSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { callApi } from '../../main/api.ts';
import { grantUploaded, sessionGrants } from '../../main/api/access.ts';
import { workspaceLayout, type HostContext } from '../../main/api/host.ts';
import { singleFileStudy, writeSingleFileStudy } from '../serve/single-file-study.ts';

const SECRET = 'root:$6$sEcReTsAlT$hash:19000:0:99999:7:::';

function session() {
  const root = mkdtempSync(join(tmpdir(), 'fenceline-access-'));
  const outside = join(root, 'outside');
  mkdirSync(outside);
  const workspaceDir = join(root, 'ws');
  const l = workspaceLayout(workspaceDir);
  for (const d of [l.studiesDir, l.runsDir]) mkdirSync(d, { recursive: true });
  writeFileSync(join(outside, 'shadow'), SECRET);
  writeFileSync(join(outside, 'secret.json'), JSON.stringify({ key: SECRET }));
  writeFileSync(join(outside, 'memo.html'), `<p>${SECRET}</p>`);
  const studyPath = writeSingleFileStudy(outside, 200);
  const ctx: HostContext = { host: 'browser', workspaceDir, access: sessionGrants(workspaceDir) };
  return { root, outside, workspaceDir, l, ctx, studyPath };
}

const refusal = (r: { ok: boolean; error?: { problems: Array<{ path: string; message: string }> } }) => {
  expect(r.ok).toBe(false);
  const text = JSON.stringify(r);
  expect(text).not.toContain('sEcReT');
  return r.error!.problems;
};

describe('the probes of the hardening review, each refused with a plain message', () => {
  it('study.open of any .json outside the session', async () => {
    const s = session();
    const p = refusal(await callApi('study.open', { path: join(s.outside, 'secret.json') }, s.ctx));
    expect(p[0]!.message).toMatch(/may not read .*secret\.json.*files you chose/);
  });
  it('study.check on a file that is not JSON quotes nothing of it, allowed or not', async () => {
    const s = session();
    refusal(await callApi('study.check', { studyPath: join(s.outside, 'shadow') }, s.ctx));
    // Even a file the session may read: the JSON error names line and column, not the text.
    const inUploads = join(s.workspaceDir, 'uploads', 'x', 'shadow.json');
    mkdirSync(join(s.workspaceDir, 'uploads', 'x'), { recursive: true });
    writeFileSync(inUploads, SECRET);
    const p = refusal(await callApi('study.check', { studyPath: inUploads }, s.ctx));
    expect(p[0]!.message).toMatch(/not valid JSON \(an unexpected character\)/);
    // And the CLI (no allow-list) says the same without the text.
    refusal(await callApi('study.check', { studyPath: join(s.outside, 'shadow') }));
  });
  it('files.list of / and of a home folder', async () => {
    const s = session();
    for (const dir of ['/', '/root', s.outside]) {
      const p = refusal(await callApi('files.list', { dir, kind: 'study' }, s.ctx));
      expect(p[0]!.message).toMatch(/lists only the workspace's own folders/);
    }
    expect((await callApi('files.list', { dir: s.l.studiesDir, kind: 'study' }, s.ctx)).ok).toBe(true);
  });
  it('study.save over or beside any .json, and a saved study naming a file the user did not pick', async () => {
    const s = session();
    const study = singleFileStudy();
    const target = join(s.outside, 'secret.json');
    refusal(await callApi('study.save', { path: target, study, baseDir: s.outside }, s.ctx));
    refusal(await callApi('study.save', { path: join(s.outside, 'new', 'made.json'), study, baseDir: s.outside }, s.ctx));
    expect(readFileSync(target, 'utf8')).toContain(SECRET);
    expect(existsSync(join(s.outside, 'new'))).toBe(false);
    // Into the workspace's studies folder, but naming the shadow file as data: refused too.
    const p = refusal(await callApi('study.save', { path: join(s.l.studiesDir, 'a', 'study.json'), study: { ...study, data: { path: join(s.outside, 'shadow') } } }, s.ctx));
    expect(p[0]!.path).toBe('data.path');
  });
  it('study.evaluate writing outside the workspace, or into another database', async () => {
    const s = session();
    refusal(await callApi('study.evaluate', { studyPath: s.studyPath, outDir: join(s.outside, 'out') }, s.ctx));
    refusal(await callApi('study.evaluate', { studyPath: s.studyPath, outDir: join(s.l.runsDir, 'r1'), workspacePath: join(s.l.runsDir, 'other.db') }, s.ctx));
    expect(existsSync(join(s.outside, 'out'))).toBe(false);
    expect(existsSync(join(s.l.runsDir, 'other.db'))).toBe(false);
    // The study itself is outside: refused before any reading.
    refusal(await callApi('study.evaluate', { studyPath: s.studyPath, outDir: join(s.l.runsDir, 'r1') }, s.ctx));
  });
  it('memo.preview of any .html', async () => {
    const s = session();
    refusal(await callApi('memo.preview', { path: join(s.outside, 'memo.html') }, s.ctx));
  });
  it('data.preview, data.check and figure.map of files the user did not pick', async () => {
    const s = session();
    refusal(await callApi('data.preview', { path: join(s.outside, 'applicants.csv') }, s.ctx));
    refusal(await callApi('data.check', { study: singleFileStudy(), baseDir: s.outside }, s.ctx));
    refusal(await callApi('figure.map', { studyPath: s.studyPath }, s.ctx));
  });
  it('an uploaded study vouches for nothing: its data and program paths must be allowed themselves', async () => {
    const s = session();
    const dir = join(s.workspaceDir, 'uploads', 'abc');
    mkdirSync(dir, { recursive: true });
    const up = join(dir, 'study.json');
    writeFileSync(up, JSON.stringify({ ...singleFileStudy(), data: { path: join(s.outside, 'applicants.csv') } }));
    expect(refusal(await callApi('study.check', { studyPath: up }, s.ctx))[0]!.path).toBe('data.path');
    writeFileSync(up, JSON.stringify({ ...singleFileStudy(), program: join(s.outside, 'secret.json') }));
    expect(refusal(await callApi('study.check', { studyPath: up }, s.ctx))[0]!.path).toBe('program');
  });
  it('a symbolic link inside the workspace does not lead out of it', async () => {
    const s = session();
    symlinkSync(s.outside, join(s.l.studiesDir, 'link'));
    refusal(await callApi('study.open', { path: join(s.l.studiesDir, 'link', 'secret.json') }, s.ctx));
    refusal(await callApi('files.list', { dir: join(s.l.studiesDir, 'link'), kind: 'study' }, s.ctx));
  });
  it('a dialog may not start where the page says unless the page may see it', async () => {
    const s = session();
    const picked: string[] = [];
    const ctx: HostContext = { ...s.ctx, dialogs: { openFile: async () => { picked.push('x'); return s.studyPath; }, saveFile: async () => join(s.outside, 'saved.json') } };
    refusal(await callApi('dialog.openFile', { purpose: 'study', defaultPath: '/etc' }, ctx));
    refusal(await callApi('dialog.saveFile', { purpose: 'study', defaultPath: join(s.outside, 'x.json') }, ctx));
    expect(picked).toEqual([]);
  });
});

describe('what the user picked is allowed, and nothing more', () => {
  it('a study picked in the dialog opens, checks and runs with its data; its folder is not opened up', async () => {
    const s = session();
    const ctx: HostContext = { ...s.ctx, dialogs: { openFile: async () => s.studyPath, saveFile: async () => join(s.outside, 'copy.json') } };
    expect(await callApi('dialog.openFile', { purpose: 'study' }, ctx)).toMatchObject({ ok: true, value: { path: s.studyPath } });
    expect(await callApi('study.open', { path: s.studyPath }, ctx)).toMatchObject({ ok: true, value: { problems: [] } });
    expect((await callApi('study.check', { studyPath: s.studyPath }, ctx)).ok).toBe(true);
    // The draft of the picked study may name its data (study.open lent it to the session).
    expect((await callApi('data.check', { study: singleFileStudy(), baseDir: s.outside }, ctx)).ok).toBe(true);
    refusal(await callApi('study.open', { path: join(s.outside, 'secret.json') }, ctx));
    // Save where the user chose in the save dialog.
    expect((await callApi('dialog.saveFile', { purpose: 'study', defaultPath: s.studyPath }, ctx)).ok).toBe(true);
    expect((await callApi('study.save', { path: join(s.outside, 'copy.json'), study: singleFileStudy(), baseDir: s.outside }, ctx)).ok).toBe(true);
  });
  it('an uploaded data file may be previewed', async () => {
    const s = session();
    const dir = join(s.workspaceDir, 'uploads', 'f00');
    mkdirSync(dir, { recursive: true });
    const file = join(dir, 'applicants.csv');
    writeFileSync(file, readFileSync(join(s.outside, 'applicants.csv')));
    grantUploaded(s.ctx.access!, file);
    expect((await callApi('data.preview', { path: file }, s.ctx)).ok).toBe(true);
  });
  it('the sample programs are readable and their studies vouch for their data', async () => {
    const s = session();
    const samples = await callApi('samples.list', {}, s.ctx);
    const first = (samples as { value: { samples: Array<{ studyPath: string }> } }).value.samples[0]!;
    expect((await callApi('study.check', { studyPath: first.studyPath }, s.ctx)).ok).toBe(true);
  });
  it('the CLI (no allow-list) uses paths as typed', async () => {
    const s = session();
    expect((await callApi('study.check', { studyPath: s.studyPath })).ok).toBe(true);
  });
});
