// Shared reader for the reference results in fixtures/robust-se/expected.json and
// fixtures/iv-textbook/expected.json (same format; formulas in fixtures/robust-se/README.md).
// It runs this engine on the same data and lists every (computed, expected) pair.
import { ols } from '../../main/estimate/ols.ts';
import { tsls } from '../../main/estimate/tsls.ts';
import type { NamedColumn, OlsResult, RegressionResult, VarianceType } from '../../main/estimate/types.ts';
import { waldF } from '../../main/estimate/variance.ts';
import { readNumericCsv } from './fixtures.ts';

type Table = Record<string, number>;
interface OlsBlock {
  coef: Table;
  se: Record<string, Table>;
  sigma: number;
  rss: number;
  r_squared: number;
}
interface FirstStageBlock extends OlsBlock {
  t: Record<string, Table>;
  F_excluded_instruments: Record<string, number>;
}
export interface ExpectedDataset {
  file: string;
  y: string;
  endog: string[];
  instruments: string[];
  controls: string[];
  cluster: string | null;
  n: number;
  ols: OlsBlock;
  first_stage: Record<string, FirstStageBlock>;
  tsls: { coef: Table; se: Record<string, Table>; sigma: number; rss: number };
  textbook_check?: { block: string; quantity: string; term: string | null; printed: string }[];
}

export interface Check {
  block: string;
  label: string;
  computed: number;
  expected: number;
}

const refName = (name: string): string => (name === '(intercept)' ? '(Intercept)' : name);
const ourType = (t: string): VarianceType =>
  t === 'nonrobust' || t === 'homoskedastic' ? 'classical' : (t as VarianceType);

function coefTable(r: RegressionResult, what: 'estimate' | 'se'): Table {
  const out: Table = {};
  for (const c of r.coefficients) out[refName(c.name)] = c[what];
  return out;
}

export interface Fitted {
  olsByType: Record<string, OlsResult>;
  firstByType: Record<string, Record<string, OlsResult>>;
  tslsByType: Record<string, ReturnType<typeof tsls>>;
}

export function fitAll(dir: string, ds: ExpectedDataset, textColumns: readonly string[] = []): { checks: Check[]; fitted: Fitted } {
  const data = readNumericCsv(`${dir}/${ds.file}`, textColumns);
  const col = (name: string): NamedColumn => ({ name, values: data[name]! });
  const y = col(ds.y);
  const endog = ds.endog.map(col);
  const instruments = ds.instruments.map(col);
  const controls = ds.controls.map(col);
  const clusters = ds.cluster ? data[ds.cluster]! : undefined;
  const withClusters = (t: VarianceType) => (t === 'CR1' ? { variance: t, clusters } : { variance: t });
  const checks: Check[] = [];
  const add = (block: string, label: string, computed: number | undefined, expected: number) =>
    checks.push({ block, label, computed: computed ?? NaN, expected });
  const fitted: Fitted = { olsByType: {}, firstByType: {}, tslsByType: {} };

  // OLS: y on [1, endogenous, controls].
  for (const type of Object.keys(ds.ols.se)) {
    const fit = ols(y, [...endog, ...controls], withClusters(ourType(type)));
    fitted.olsByType[type] = fit;
    const se = coefTable(fit, 'se');
    for (const [term, v] of Object.entries(ds.ols.se[type]!)) add('ols', `se.${type}.${term}`, se[term], v);
    if (type === 'nonrobust') {
      const b = coefTable(fit, 'estimate');
      for (const [term, v] of Object.entries(ds.ols.coef)) add('ols', `coef.${term}`, b[term], v);
      add('ols', 'sigma', fit.sigma, ds.ols.sigma);
      add('ols', 'rss', fit.rss, ds.ols.rss);
      add('ols', 'r_squared', fit.rSquared, ds.ols.r_squared);
    }
  }

  // First stage: each endogenous column on [1, instruments, controls].
  for (const [name, fs] of Object.entries(ds.first_stage)) {
    fitted.firstByType[name] = {};
    for (const type of Object.keys(fs.se)) {
      const fit = ols(col(name), [...instruments, ...controls], withClusters(ourType(type)));
      fitted.firstByType[name]![type] = fit;
      const se = coefTable(fit, 'se');
      const b = coefTable(fit, 'estimate');
      for (const [term, v] of Object.entries(fs.se[type]!)) add('first_stage', `${name}.se.${type}.${term}`, se[term], v);
      for (const [term, v] of Object.entries(fs.t[type]!)) {
        add('first_stage', `${name}.t.${type}.${term}`, fit.coefficients.find((c) => refName(c.name) === term)?.z, v);
      }
      const positions = ds.instruments.map((z) => fit.coefficients.findIndex((c) => c.name === z));
      const coef = Float64Array.from(fit.coefficients, (c) => c.estimate);
      add('first_stage', `${name}.F.${type}`, waldF(coef, fit.covariance, fit.k, positions), fs.F_excluded_instruments[type]!);
      if (type === 'nonrobust') {
        for (const [term, v] of Object.entries(fs.coef)) add('first_stage', `${name}.coef.${term}`, b[term], v);
        add('first_stage', `${name}.sigma`, fit.sigma, fs.sigma);
        add('first_stage', `${name}.rss`, fit.rss, fs.rss);
        add('first_stage', `${name}.r_squared`, fit.rSquared, fs.r_squared);
      }
    }
  }

  // 2SLS, and the first-stage F it reports.
  for (const type of Object.keys(ds.tsls.se)) {
    if (type === 'homoskedastic_no_dfc') continue;
    const fit = tsls({ outcome: y, endogenous: endog, instruments, controls }, withClusters(ourType(type)));
    fitted.tslsByType[type] = fit;
    const se = coefTable(fit, 'se');
    for (const [term, v] of Object.entries(ds.tsls.se[type]!)) add('tsls', `se.${type}.${term}`, se[term], v);
    for (const fs of fit.firstStages) {
      const fsType = type === 'homoskedastic' ? 'nonrobust' : type;
      add('tsls', `firstStages.${fs.endogenous}.F.${type}`, fs.F, ds.first_stage[fs.endogenous]!.F_excluded_instruments[fsType]!);
    }
    if (type === 'homoskedastic') {
      const b = coefTable(fit, 'estimate');
      for (const [term, v] of Object.entries(ds.tsls.coef)) add('tsls', `coef.${term}`, b[term], v);
      add('tsls', 'sigma', fit.sigma, ds.tsls.sigma);
      add('tsls', 'rss', fit.rss, ds.tsls.rss);
      // σ² = u'u/N instead of u'u/(N−K): the classical SE times √((N−K)/N) (same README).
      const factor = Math.sqrt(fit.dfResidual / fit.n);
      for (const [term, v] of Object.entries(ds.tsls.se.homoskedastic_no_dfc ?? {})) {
        add('tsls', `se.homoskedastic_no_dfc.${term} (derived)`, se[term]! * factor, v);
      }
    }
  }
  return { checks, fitted };
}
