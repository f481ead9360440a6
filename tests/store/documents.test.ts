// Programs and studies with history: saving never overwrites; each save adds a version.

import { describe, expect, it } from 'vitest';
import { openWorkspace } from '../../main/store/workspace.ts';
import { manualClock, must, openFresh, problemsOf, tempWorkspacePath } from './helpers.ts';

const studyV1 = { fenceline: 1, title: 'Winter energy credit, first season', settings: { deltas: [0.05, 0.1, 0.2], draws: 4000, seed: 1 } };
const studyV2 = { ...studyV1, settings: { ...studyV1.settings, draws: 8000 } };

describe('studies', () => {
  it('add a version on each save and keep every earlier one', () => {
    const clock = manualClock('2025-01-01T00:00:00Z');
    const ws = must(openWorkspace(tempWorkspacePath(), { now: clock.now }));
    clock.set('2025-01-02T09:00:00Z');
    const first = must(ws.saveStudy({ name: 'Winter credit', study: studyV1 }));
    expect(first.version).toBe(1);
    clock.set('2025-01-03T09:00:00Z');
    const second = must(ws.saveStudy({ studyId: first.studyId, name: 'Winter credit (more draws)', study: studyV2 }));
    expect(second).toEqual({ studyId: first.studyId, version: 2 });

    expect(must(ws.getStudy(first.studyId)).study).toEqual(studyV2);
    const v1 = must(ws.getStudy(first.studyId, 1));
    expect(v1).toEqual({ studyId: first.studyId, version: 1, name: 'Winter credit', savedAt: '2025-01-02T09:00:00.000Z', study: studyV1 });
    expect(must(ws.studyHistory(first.studyId))).toEqual([
      { version: 1, name: 'Winter credit', savedAt: '2025-01-02T09:00:00.000Z' },
      { version: 2, name: 'Winter credit (more draws)', savedAt: '2025-01-03T09:00:00.000Z' },
    ]);
    expect(must(ws.listStudies())[0]).toMatchObject({ createdAt: '2025-01-02T09:00:00.000Z', updatedAt: '2025-01-03T09:00:00.000Z' });
    ws.close();
  });

  it('are listed newest first with their latest name and version', () => {
    const ws = openFresh();
    const a = must(ws.saveStudy({ name: 'A', study: { a: 1 } }));
    const b = must(ws.saveStudy({ name: 'B', study: { b: 1 } }));
    must(ws.saveStudy({ studyId: a.studyId, name: 'A, revised', study: { a: 2 } }));
    const list = must(ws.listStudies());
    expect(list.map((s) => [s.studyId, s.name, s.latestVersion])).toEqual([[a.studyId, 'A, revised', 2], [b.studyId, 'B', 1]]);
    expect(list[0]!.createdAt < list[0]!.updatedAt).toBe(true);
    ws.close();
  });

  it('refuse an unknown id, a missing name or a document JSON cannot hold, storing nothing', () => {
    const ws = openFresh();
    expect(problemsOf(ws.saveStudy({ studyId: 42, name: 'X', study: {} }))[0]).toMatchObject({ path: 'studyId', message: expect.stringMatching(/no study with id 42 in the workspace "test.fenceline"/) });
    expect(problemsOf(ws.saveStudy({ studyId: 1.5, name: 'X', study: {} }))[0]!.path).toBe('studyId');
    expect(problemsOf(ws.saveStudy({ name: '  ', study: {} }))[0]).toMatchObject({ path: 'name' });
    expect(problemsOf(ws.saveStudy({ name: 'X', study: { settings: { deltas: new Float64Array(2) } } }))[0]!.path).toBe('study.settings.deltas');
    expect(must(ws.listStudies())).toEqual([]);
    ws.close();
  });

  it('say which versions exist when asked for one that does not', () => {
    const ws = openFresh();
    const { studyId } = must(ws.saveStudy({ name: 'A', study: {} }));
    must(ws.saveStudy({ studyId, name: 'A', study: {} }));
    expect(problemsOf(ws.getStudy(studyId, 9))[0]!.message).toMatch(/has no version 9; its versions run from 1 to 2/);
    expect(problemsOf(ws.getStudy(studyId, 0))[0]!.path).toBe('version');
    expect(problemsOf(ws.getStudy(999))[0]!.message).toMatch(/no study with id 999/);
    expect(problemsOf(ws.studyHistory(999))[0]!.message).toMatch(/no study with id 999/);
    ws.close();
  });
});

describe('programs', () => {
  const program = {
    name: 'Winter Energy Credit (invented example)',
    variables: [{ key: 'income', label: 'Annual household income', type: 'continuous', column: 'HH_INCOME', scale: 10000 }],
    rule: { value: 'income', op: '<=', limit: 21000 },
    offer: { ifEligible: 1, ifIneligible: 0 },
  };

  it('are saved, versioned and listed apart from studies', () => {
    const ws = openFresh();
    must(ws.saveStudy({ name: 'A study', study: {} }));
    const p = must(ws.saveProgram({ name: 'Winter credit rule', program }));
    expect(p.version).toBe(1);
    const edited = { ...program, rule: { value: 'income', op: '<=', limit: 22000 } };
    expect(must(ws.saveProgram({ programId: p.programId, name: 'Winter credit rule', program: edited })).version).toBe(2);
    expect(must(ws.getProgram(p.programId, 1)).program).toEqual(program);
    expect(must(ws.getProgram(p.programId)).program).toEqual(edited);
    expect(must(ws.listPrograms()).map((x) => [x.name, x.latestVersion])).toEqual([['Winter credit rule', 2]]);
    expect(must(ws.programHistory(p.programId)).map((h) => h.version)).toEqual([1, 2]);
    expect(problemsOf(ws.saveProgram({ programId: 77, name: 'x', program }))[0]!.message).toMatch(/no program with id 77/);
    ws.close();
  });
});
