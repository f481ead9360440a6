// The sample programs end to end, as a user runs them: the command line on each study in
// sample-programs/, checked against what its seeded generator built in (main/sample-data/):
// the true effect lies inside the reported 95% interval, the rows spoilt on purpose are
// excluded and counted with their reasons and spreadsheet rows, and the joins report the
// unmatched and duplicate keys planted in the payment list and the outcome file.
// The "outside source" here is the data-generating process itself: the effect is fixed by
// construction, so the check does not depend on Fenceline's own numbers.
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { apprenticeVoucherSample, APPRENTICE_VOUCHER_TRUE_EFFECT } from '../../main/sample-data/apprentice-voucher.ts';
import { homeRepairSample, HOME_REPAIR_TRUE_EFFECT } from '../../main/sample-data/home-repair.ts';
import type { PlantedDefect, SampleFiles } from '../../main/sample-data/sample-sheet.ts';
import { tutoringLotterySample, TUTORING_LOTTERY_TRUE_EFFECT } from '../../main/sample-data/tutoring-lottery.ts';
import { winterCreditSample, WINTER_CREDIT_TRUE_EFFECT } from '../../main/sample-data/winter-credit.ts';

const ROOT = join(__dirname, '../..');

interface Run { code: number | null; stdout: string; stderr: string; results: any }

function evaluate(folder: string): Promise<Run> {
  const out = mkdtempSync(join(tmpdir(), `fenceline-sample-${folder}-`));
  const args = ['--import', 'tsx', join(ROOT, 'main/cli.ts'), 'evaluate', join(ROOT, 'sample-programs', folder, 'study.json'), '--out', out, '--formats', 'none', '--draws', '1000'];
  return new Promise((done) => {
    const child = spawn(process.execPath, args, { cwd: ROOT });
    let stdout = '', stderr = '';
    child.stdout.on('data', (b) => { stdout += b; });
    child.stderr.on('data', (b) => { stderr += b; });
    child.on('close', (code) => {
      let results: any = null;
      try { results = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8')); } catch { /* reported by the exit-code check */ }
      done({ code, stdout, stderr, results });
    });
  });
}

interface Case {
  folder: string;
  trueEffect: number;
  sample: SampleFiles & { planted: PlantedDefect[] };
}

const CASES: Case[] = [
  { folder: 'apprentice-voucher', trueEffect: APPRENTICE_VOUCHER_TRUE_EFFECT, sample: apprenticeVoucherSample() },
  { folder: 'winter-credit', trueEffect: WINTER_CREDIT_TRUE_EFFECT, sample: winterCreditSample() },
  { folder: 'home-repair', trueEffect: HOME_REPAIR_TRUE_EFFECT, sample: homeRepairSample() },
  { folder: 'tutoring-lottery', trueEffect: TUTORING_LOTTERY_TRUE_EFFECT, sample: tutoringLotterySample() },
];

const runs = new Map<string, Run>();

beforeAll(async () => {
  // two at a time: the machine has two cores
  for (let i = 0; i < CASES.length; i += 2) {
    const pair = CASES.slice(i, i + 2);
    const got = await Promise.all(pair.map((c) => evaluate(c.folder)));
    pair.forEach((c, k) => runs.set(c.folder, got[k]!));
  }
}, 120_000);

describe.each(CASES)('sample program $folder', ({ folder, trueEffect, sample }) => {
  const run = () => runs.get(folder)!;

  it('runs to the end (exit 0) and reads every row of the committed file', () => {
    expect(run().code, run().stderr).toBe(0);
    const unitSheet = sample.sheets[0]!;
    expect(run().results.study.dataFile).toBe(unitSheet.file);
    expect(run().results.study.rowsRead).toBe(unitSheet.rows.length);
  });

  it('keeps every file under 1 MB', () => {
    for (const s of sample.sheets) expect(statSync(join(ROOT, 'sample-programs', folder, s.file)).size).toBeLessThan(1024 * 1024);
  });

  it('recovers the built-in effect within the 95% interval at the middle delta and at another', () => {
    const byDelta: any[] = run().results.outcomes[0].byDelta;
    expect(byDelta.length).toBe(3);
    const covers = byDelta.map((d) => d.estimable && d.ci[0] < trueEffect && trueEffect < d.ci[1]);
    expect(covers[1], JSON.stringify(byDelta.map((d) => [d.delta, d.ci]))).toBe(true);
    expect(covers[0] || covers[2]).toBe(true);
    const mid = byDelta[1];
    // a useful interval: a strong first stage and an interval that excludes zero
    expect(mid.firstStage.F).toBeGreaterThan(50);
    expect(mid.ci[0] > 0 || mid.ci[1] < 0).toBe(true);
  });

  it('excludes and counts each planted bad row with its reason and spreadsheet row', () => {
    const study = run().results.study;
    const expected = new Map<string, number[]>();
    for (const p of sample.planted) expected.set(p.reason, [...(expected.get(p.reason) ?? []), p.sheetRow].sort((a, b) => a - b));
    const got = new Map<string, number[]>(study.rowsExcluded.map((e: any) => [e.reason, [...e.rows].sort((a: number, b: number) => a - b)]));
    expect(got).toEqual(expected);
    for (const e of study.rowsExcluded) expect(e.count).toBe(e.rows.length);
    expect(study.rowsUsed).toBe(study.rowsRead - sample.planted.length);
  });

  it('gives its continuous inputs a resolution finer than the neighbourhood (no coarse-variable warning)', () => {
    expect(run().results.warnings.filter((w: any) => w.code === 'coarse-variable')).toEqual([]);
  });

  it('has a README that says the data are invented and states the effect built in', () => {
    const readme = readFileSync(join(ROOT, 'sample-programs', folder, 'README.md'), 'utf8');
    expect(readme).toMatch(/invented/i);
    const written = Math.abs(trueEffect).toLocaleString('en-US');
    expect(readme).toContain(written);
  });
});

describe('winter-credit: three files joined by the unit ID', () => {
  const s = CASES[1]!.sample as ReturnType<typeof winterCreditSample>;
  const results = () => runs.get('winter-credit')!.results;

  it('reports the payment list\'s and the outcome file\'s unmatched and duplicate keys', () => {
    const joins = results().study.joins;
    expect(joins.map((j: any) => j.source)).toEqual(['payments.xlsx', 'outcomes.csv']);
    const [pay, out] = joins;
    expect(pay.unmatchedKeys).toEqual({ count: s.joinDefects.payments.unmatched.length, examples: s.joinDefects.payments.unmatched });
    expect(pay.duplicateKeys).toEqual({ count: s.joinDefects.payments.duplicated.length, examples: s.joinDefects.payments.duplicated });
    expect(out.unmatchedKeys).toEqual({ count: s.joinDefects.outcomes.unmatched.length, examples: s.joinDefects.outcomes.unmatched });
    expect(out.duplicateKeys).toEqual({ count: s.joinDefects.outcomes.duplicated.length, examples: s.joinDefects.outcomes.duplicated });
    const blank = results().study.notes.find((n: any) => n.code === 'join-blank-key');
    expect(blank.message).toContain(`row ${s.joinDefects.payments.blankKeyRows[0]}`);
  });

  it('takes receipt from the payment list and leaves units without an outcome row out of that outcome only', () => {
    expect(results().estimand.kind).toBe('treatment');
    const missing = results().outcomes[0].missing;
    expect(missing).toBe(s.outcomeMissing.length + s.joinDefects.outcomes.duplicated.length);
    const note = results().study.notes.find((n: any) => n.code === 'outcome-missing');
    expect(note.message).toContain(`${s.outcomeMissing.length}: no row in outcomes.csv`);
  });
});

describe('tutoring-lottery: a lottery among the eligible', () => {
  const s = CASES[3]!.sample as ReturnType<typeof tutoringLotterySample>;
  it('uses the recorded draw as the instrument and reports offers the cut-off rules out', () => {
    const r = runs.get('tutoring-lottery')!.results;
    expect(r.program.offerKind).toBe('lottery');
    expect(r.instrument.source).toBe('recorded-decision');
    expect(r.fidelity.offeredAgainstRule).toBe(s.overrides.length);
    expect(r.fidelity.disagree).toBe(s.overrides.length);
    expect([...r.fidelity.disagreeIds].sort()).toEqual([...s.overrides].sort());
  });
});
