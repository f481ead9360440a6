// Degenerate data through the whole pipeline and into the estimators (issue "Hardened", §3):
// outcomes all missing, constant, near the largest double (1e308), NaN or Infinity mixed in, and
// take-up that never varies. Property-based (fast-check): whatever such columns hold, runStudy
// answers — results or input problems — and never throws; every check either reports or says why
// it could not. Invented data: one running variable (a score) with one cut-off, so the
// local-linear cross-check (Imbens and Kalyanaraman 2012) and the density test (McCrary 2008) run.

import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { runStudy } from '../../main/pipeline/run-study.ts';
import { validateStudy } from '../../main/studyfile/validate.ts';
import { localLinear, ikBandwidth, tryLocalLinear } from '../../main/estimate/local-linear.ts';
import { mccraryTest } from '../../main/estimate/density.ts';
import { EstimateInputError } from '../../main/estimate/errors.ts';

const N = 240;
const program = {
  name: 'Reading support (invented example)', unit: 'pupil',
  variables: [{ key: 'score', label: 'Reading score', type: 'continuous', column: 'SCORE', scale: 10 }],
  rule: { value: 'score', op: '<=', limit: 50 },
  offer: { ifEligible: 1, ifIneligible: 0 },
};

/** A column of N cells of one degenerate kind (as written in the CSV). */
const degenerate = fc.oneof(
  fc.constant(() => ''),                                          // all missing
  fc.double({ noNaN: true, noDefaultInfinity: true }).map((c) => () => String(c)), // constant
  fc.constant((i: number) => (i % 2 ? '1e308' : '-1e308')),       // overflow in sums of squares
  fc.constant((i: number) => (i % 5 === 0 ? (i % 2 ? 'NaN' : 'Infinity') : String(i % 7))), // NaN/Inf mixed in
  fc.constant((i: number) => (i % 3 === 0 ? '1.7976931348623157e308' : '0')),
  fc.constant((i: number) => String(i % 2)),                      // an ordinary column, for contrast
);
const takeUp = fc.oneof(fc.constant(() => '1'), fc.constant(() => '0'), fc.constant((i: number) => String(i % 2)), fc.constant(() => ''));

async function runWith(outcome: (i: number) => string, received: (i: number) => string) {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-degenerate-'));
  const lines = ['ID,SCORE,OUTCOME,RECEIVED,COVAR'];
  for (let i = 0; i < N; i++) lines.push([`P${i}`, 30 + (i * 40) / N, outcome(i), received(i), outcome(i + 1)].join(','));
  writeFileSync(join(dir, 'data.csv'), lines.join('\r\n') + '\r\n');
  const study = validateStudy({
    fenceline: 1, title: 'Degenerate (invented)', program, data: { path: 'data.csv' },
    columns: { id: 'ID', outcomes: [{ column: 'OUTCOME' }], treatment: 'RECEIVED', covariates: ['COVAR'] },
    settings: { deltas: [0.5, 1], draws: 64, seed: 1 },
  });
  if (!study.ok) throw new Error(JSON.stringify(study.problems));
  return runStudy(study.value, { baseDir: dir, workers: 0 });
}

describe('the pipeline on degenerate columns', () => {
  it('answers with results or input problems, never an exception', async () => {
    await fc.assert(fc.asyncProperty(degenerate, takeUp, async (outcome, received) => {
      const r = await runWith(outcome, received);
      if (r.ok) expect(() => JSON.stringify(r.value.results)).not.toThrow();
      else for (const p of r.problems) expect(p.message.length).toBeGreaterThan(0);
    }), { numRuns: 24, seed: 20261202 });
  }, 300_000);
});

describe('the estimators on degenerate columns', () => {
  const running = Float64Array.from({ length: N }, (_, i) => 30 + (i * 40) / N);
  const offer = Float64Array.from(running, (x) => (x <= 50 ? 1 : 0));
  const column = (f: (i: number) => string) => Float64Array.from({ length: N }, (_, i) => { const t = f(i); return t === '' ? NaN : Number(t); });
  it('local-linear and its bandwidth report or refuse with a typed input error, never another throw', () => {
    fc.assert(fc.property(degenerate, takeUp, (outcome, received) => {
      try {
        const r = localLinear({ running, cutoff: 50, outcome: column(outcome), offer, treatment: column(received) });
        expect(typeof r.estimate).toBe('number');
        ikBandwidth(running, column(outcome), 50, Uint8Array.from(offer));
      } catch (e) {
        expect(e, String(e)).toBeInstanceOf(EstimateInputError);
      }
      // What the pipeline calls: a typed "not estimable" answer with a reason instead of any throw.
      const checked = tryLocalLinear({ running, cutoff: 50, outcome: column(outcome), offer, treatment: column(received) });
      if (checked.ok) expect(Number.isFinite(checked.value.estimate)).toBe(true);
      else expect(checked.reason).toMatch(/\w/);
    }), { numRuns: 60, seed: 7 });
  });
  it('the density test reports on any running column', () => {
    fc.assert(fc.property(degenerate, (values) => {
      try {
        const r = mccraryTest(column(values), 50);
        expect(r).toBeDefined();
      } catch (e) {
        expect(e, String(e)).toBeInstanceOf(EstimateInputError);
      }
    }), { numRuns: 40, seed: 11 });
  });
});
