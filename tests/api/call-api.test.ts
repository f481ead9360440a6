import { describe, expect, it } from 'vitest';
import { callApi } from '../../main/api.ts';

describe('callApi refuses what is outside the contract before doing any work', () => {
  it('an unknown method', async () => {
    const r = await callApi('fs.readFile', { path: '/etc/passwd' });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems[0]!.message).toMatch(/not a Fenceline api method/);
  });
  it('arguments of the wrong shape, each named', async () => {
    const r = await callApi('study.evaluate', { studyPath: 3, outDir: '/tmp/x', formats: ['pdf', 'exe'], extra: true });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems.map((p) => p.path).sort()).toEqual(['args.extra', 'args.formats[1]', 'args.studyPath']);
  });
  it('a missing required argument', async () => {
    const r = await callApi('study.check', {});
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems).toEqual([{ path: 'args.studyPath', message: 'args.studyPath is missing.' }]);
  });
  it('passes a well-formed call through to the method', async () => {
    const r = await callApi('study.check', { studyPath: '/nonexistent/study.json' });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems[0]!.message).toMatch(/study\.json was not found/);
  });
});
