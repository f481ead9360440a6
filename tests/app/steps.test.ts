import { describe, expect, it } from 'vitest';
import { normalizeDraft } from '../../app/lib/draft.ts';
import { parseNumberList, pathStatus, type PathState } from '../../app/lib/steps.ts';
import { sampleStudy } from './helpers.ts';

const base = (over: Partial<PathState> = {}): PathState => ({
  draft: null, programCheck: null, dataReport: null, dataReportCurrent: false, run: null, runCurrent: true, memoFiles: [], memoFormatsAvailable: true, ...over,
});

describe('a run of an earlier version of the study is out of date', () => {
  it('Run, Evidence, Map and Memo lose their ✓ and say why', () => {
    const run = { outDir: '/o', files: ['/o/memo.pdf'], results: {} as never, runId: 3, studySha256: 'a', timings: {} };
    const current = pathStatus(base({ run, memoFiles: ['/o/memo.pdf'] }));
    const stale = pathStatus(base({ run, memoFiles: ['/o/memo.pdf'], runCurrent: false }));
    for (const id of ['run', 'evidence', 'map', 'memo'] as const) {
      expect(current.find((x) => x.id === id)!.done).toBe(true);
      const st = stale.find((x) => x.id === id)!;
      expect(st.done).toBe(false);
      expect(st.missing.join()).toMatch(/out of date|changed since its last run/);
    }
  });
});

describe('the guided path says what is done and what is missing', () => {
  it('with nothing open, only Start is actionable', () => {
    const s = pathStatus(base());
    expect(s.map((x) => x.done)).toEqual([false, false, false, false, false, false, false]);
    expect(s[0]!.missing[0]).toMatch(/open a study/);
  });
  it('names the rule problems still to fix and asks for a data check once mapped', () => {
    const draft = normalizeDraft(sampleStudy());
    const s = pathStatus(base({ draft, programCheck: { valid: false, problems: [{ path: 'program.name', message: 'x' }], reading: null, offerReading: null, criteria: [] } }));
    expect(s.find((x) => x.id === 'rule')!.missing).toEqual(['fix 1 problem in the rule']);
    expect(s.find((x) => x.id === 'data')!.missing).toEqual(['check the data']);
  });
  it('a data check made before the last change no longer counts', () => {
    const draft = normalizeDraft(sampleStudy());
    const report = {} as never;
    expect(pathStatus(base({ draft, dataReport: report, dataReportCurrent: true })).find((x) => x.id === 'data')!.done).toBe(true);
    expect(pathStatus(base({ draft, dataReport: report, dataReportCurrent: false })).find((x) => x.id === 'data')!.done).toBe(false);
  });
});

describe('radius lists typed by the analyst', () => {
  it('reads commas, semicolons and spaces', () => {
    expect(parseNumberList('0.05, 0.1;0.2  0.4')).toEqual({ ok: true, values: [0.05, 0.1, 0.2, 0.4] });
  });
  it('names the entry that is not a number', () => {
    const r = parseNumberList('0.05, 0,1x');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(/"1x" is not a number/);
    expect(parseNumberList(' ').ok).toBe(false);
  });
});
