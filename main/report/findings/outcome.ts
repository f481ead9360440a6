// Whether each effect can be told apart from no effect, at the headline delta (issue 10 §4):
// only when every interval that applies excludes zero — the usual 95% interval, the
// weak-instrument-robust Anderson–Rubin set (Anderson and Rubin 1949, Ann. Math. Statist.
// 20:46–63), the tF interval when the first-stage F is below 104.7 (Lee, McCrary, Moreira and
// Porter 2022, AER 112(10):3260–3290), and the wild cluster bootstrap interval when the results
// carry one (Cameron, Gelbach and Miller 2008, Rev. Econ. Stat. 90(3):414–427). Otherwise the
// finding names the interval that covers zero.

import type { OutcomeFinding, OutcomeResults, ResultsCore } from '../../contract/results.ts';
import { intervalOnZero, setOnZero } from './intervals.ts';
import { FINDING_THRESHOLDS as T } from './thresholds.ts';
import { listWords, plainInterval } from './words.ts';

type Entry = OutcomeResults['byDelta'][number];

/** The wild cluster bootstrap at one delta (CLI.md format 1.1), when present (results written
 * before it lack the field). An unbounded end is null. */
export interface WildBootstrapView { p: number | null; ci: [number | null, number | null]; weights: string; reps: number }

export function wildBootstrapOf(b: Entry): WildBootstrapView | null {
  const w = b.wildBootstrap;
  if (!w) return null;
  return { p: Number.isFinite(w.p) ? w.p : null, ci: w.ci, weights: w.weights, reps: w.reps };
}

export function clusterCountOf(b: Entry): number | null {
  return typeof b.clusters === 'number' && b.clusters > 0 ? b.clusters : null;
}

function baselineOf(b: Entry): { mean: number; n: number } | null {
  return b.baseline ?? null;
}

const NAMES = {
  usual: 'the usual 95% interval',
  'Anderson–Rubin': 'the weak-instrument-robust (Anderson–Rubin) set',
  tF: 'the tF interval (first-stage F below 104.7)',
  bootstrap: 'the wild cluster bootstrap interval',
} as const;

function clusterNote(count: number, bootstrap: boolean): { count: number; few: boolean; note: string } {
  const few = count < T.FEW_CLUSTERS;
  const note = few
    ? bootstrap
      ? `with ${count} clusters the usual cluster-robust interval can be too narrow; the bootstrap interval is the one to read`
      : `with ${count} clusters the usual cluster-robust interval can be too narrow, and no bootstrap interval was computed: read it with care`
    : `${count} clusters, enough for the usual cluster-robust interval`;
  return { count, few, note };
}

export function outcomeFinding(r: ResultsCore, o: OutcomeResults, k: number): OutcomeFinding {
  const delta = r.settings.deltas[k]!;
  const b = o.byDelta[k];
  const notEstimableAt = o.byDelta.filter((x) => !x.estimable || !x.ci).map((x) => x.delta);
  const coversZeroElsewhere = o.byDelta.filter((x, j) => j !== k && x.estimable && intervalOnZero(x.ci) === 'covers').map((x) => x.delta);
  const base = { column: o.column, label: o.label, delta, coversZeroElsewhere, notEstimableAt };
  if (!b || !b.estimable || b.estimate === null || !b.ci) {
    return {
      ...base, effect: 'not estimable',
      because: `there is no estimate at delta ${delta} (too few units near the edge, or the offer or take-up does not vary there; see the warnings)`,
      usual: null, anderson: null, tf: null, bootstrap: null, coveringZero: [], baseline: b ? baselineOf(b) : null,
      clusters: null,
    };
  }
  const treatment = r.estimand.kind === 'treatment';
  const usual = intervalOnZero(b.ci);
  const anderson = treatment ? setOnZero(b.arCi) : null;
  const F = b.firstStage?.F;
  const tfApplies = treatment && typeof F === 'number' && !(F >= T.TF_FULL);
  const tf = tfApplies ? (b.tfCi ? intervalOnZero(b.tfCi) : 'covers') : null;
  const boot = wildBootstrapOf(b);
  const bootstrap = boot ? intervalOnZero(boot.ci) : null;
  const checks: Array<[keyof typeof NAMES, 'excludes' | 'covers' | null, string]> = [
    ['usual', usual, plainInterval(b.ci)],
    ['Anderson–Rubin', anderson, b.arCi ? b.arCi.map((c) => plainInterval(c)).join(' or ') : ''],
    ['tF', tf, b.tfCi ? plainInterval(b.tfCi) : 'unbounded'],
    ['bootstrap', bootstrap, boot ? plainInterval(boot.ci) : ''],
  ];
  const read = checks.filter(([, v]) => v !== null);
  const covering = read.filter(([, v]) => v === 'covers');
  const coveringZero = covering.map(([name]) => name);
  const distinguishable = usual === 'excludes' && (!treatment || anderson === 'excludes') && covering.length === 0;
  const described = (list: typeof read) => listWords(list.map(([name, , ci]) => `${NAMES[name]} (${ci})`));
  let because = distinguishable
    ? `at delta ${delta}, ${described(read)} ${read.length > 1 ? 'all exclude' : 'excludes'} zero`
    : covering.length
      ? `at delta ${delta}, ${described(covering)} ${covering.length > 1 ? 'cover' : 'covers'} zero`
      : `at delta ${delta}, the weak-instrument-robust set could not be computed`;
  if (coversZeroElsewhere.length) because += `; at delta ${listWords(coversZeroElsewhere.map(String))} the usual 95% interval covers zero`;
  const count = clusterCountOf(b);
  return {
    ...base,
    effect: distinguishable ? 'distinguishable' : 'not distinguishable',
    because,
    usual, anderson, tf, bootstrap, coveringZero,
    baseline: baselineOf(b),
    clusters: count === null ? null : clusterNote(count, boot !== null),
  };
}

