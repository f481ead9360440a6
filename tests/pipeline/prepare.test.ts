// `check` runs the same stages as `evaluate` up to estimation (pipeline/run-study.ts
// prepareStudy), so it never says "ready" for a study evaluate refuses: no usable row, or a rule
// whose design cannot identify any effect (deterministic, with no continuous input: every unit's
// APS is 0 or 1 at every delta, Narita and Yata's design has no unit near the edge).

import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { checkStudy } from '../../main/api/check.ts';
import { evaluateStudy } from '../../main/api/evaluate.ts';
import { fixtureCsv, fixtureStudy } from '../report/memo-fixture.ts';

function write(study: unknown, csv: string): string {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-prepare-'));
  writeFileSync(join(dir, 'cases.csv'), csv);
  writeFileSync(join(dir, 'study.json'), JSON.stringify(study));
  return join(dir, 'study.json');
}

const sizeOnly = () => {
  const s = fixtureStudy();
  s.program.variables = s.program.variables.filter((v) => v.key === 'size');
  s.program.rule = { all: [{ value: 'size', op: '>=', limit: 3 }] } as never;
  return s;
};

describe('check and evaluate refuse alike', () => {
  it('a deterministic rule with no continuous input: the design cannot estimate an effect, and says what would', async () => {
    const path = write(sizeOnly(), fixtureCsv(600));
    for (const r of [await checkStudy({ studyPath: path }), await evaluateStudy({ studyPath: path, outDir: join(path, '..', 'out'), formats: [], workers: 0 })]) {
      expect(r.ok).toBe(false);
      if (r.ok) continue;
      expect(r.error.kind).toBe('input');
      expect(r.error.problems[0]!.message).toMatch(/no continuous input.*no unit can sit near its edge at any delta.*a criterion on a continuous input.*or a lottery/);
    }
  });

  it('the same rule with a lottery among the eligible is a design (lottery units are near no edge but have 0 < APS < 1)', async () => {
    const s = sizeOnly();
    s.program.offer = { ifEligible: 0.5, ifIneligible: 0 };
    const r = await checkStudy({ studyPath: write(s, fixtureCsv(600)) });
    expect(r, JSON.stringify(r)).toMatchObject({ ok: true });
  });

  it('no usable row: "0 usable rows" with the largest reasons, from check as from evaluate', async () => {
    const csv = fixtureCsv(50).split('\n').map((line, i) => (i === 0 || !line ? line : line.replace(/^([^,]*),[^,]*,/, '$1,n/a,'))).join('\n');
    const path = write(fixtureStudy(), csv);
    for (const r of [await checkStudy({ studyPath: path }), await evaluateStudy({ studyPath: path, outDir: join(path, '..', 'out'), formats: [], workers: 0 })]) {
      expect(r.ok).toBe(false);
      if (r.ok) continue;
      expect(r.error.problems[0]!.message).toMatch(/^0 usable rows: .*\(53 read\): 5\d INCOME/);
    }
  });
});
