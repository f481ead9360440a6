// The headline APS estimator (main/estimate/aps-iv.ts): every number checked against the general
// regression core (tsls.ts, ols.ts, weak-iv.ts — themselves checked against NIST StRD and
// textbook/reference IV results in tests/reference), exact identities (Wald 1940 ratio; naive OLS
// on a binary D = difference in means), the Anderson–Rubin set's behaviour (close to Wald under a
// strong instrument, unbounded when the instrument is irrelevant; Mikusheva 2010), and the words
// given for every bad situation.
import { describe, expect, it } from 'vitest';
import { estimateApsIv, type ApsIvInput } from '../../main/estimate/aps-iv.ts';
import { ols } from '../../main/estimate/ols.ts';
import { tsls } from '../../main/estimate/tsls.ts';
import { andersonRubinSet, weakInstrumentChecks } from '../../main/estimate/weak-iv.ts';
import { tCritical, twoSidedTP } from '../../main/estimate/student-t.ts';
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import type { NamedColumn } from '../../main/estimate/types.ts';
import { inputErrorOf } from './errors-helper.ts';
import { column, rng } from './random.ts';

const col = (name: string, values: Float64Array): NamedColumn => ({ name, values });

interface Data {
  n: number;
  aps: Float64Array;
  z: Float64Array;
  d: Float64Array;
  y: Float64Array;
  y2: Float64Array;
  w: Float64Array;
  g: Float64Array;
}

/** Synthetic units: about 30% with APS 0 or 1, the rest in (0, 1); Z ~ Bernoulli(APS). */
function data(seed: number, n: number, firstStage = 0.6): Data {
  const r = rng(seed);
  const aps = column(n, () => {
    const u = r.uniform();
    return u < 0.15 ? 0 : u < 0.3 ? 1 : 0.05 + 0.9 * r.uniform();
  });
  const z = column(n, (i) => (r.uniform() < aps[i]! ? 1 : 0));
  const w = column(n, () => r.normal());
  const u = column(n, () => r.normal());
  const d = column(n, (i) => (r.uniform() < 0.2 + firstStage * z[i]! + 0.1 * Math.tanh(u[i]!) ? 1 : 0));
  const y = column(n, (i) => 1 + 2 * d[i]! + 1.5 * aps[i]! + 0.5 * w[i]! + u[i]! + (0.5 + aps[i]!) * r.normal());
  const y2 = column(n, (i) => -d[i]! + w[i]! + r.normal());
  const g = column(n, (i) => (i * 7) % 23);
  return { n, aps, z, d, y, y2, w, g };
}

function boundaryRows(x: Data): number[] {
  return [...Array(x.n).keys()].filter((i) => x.aps[i]! > 0 && x.aps[i]! < 1);
}
const pick = (v: Float64Array, rows: number[]) => Float64Array.from(rows, (i) => v[i]!);

function input(x: Data, extra: Partial<ApsIvInput> = {}): ApsIvInput {
  return {
    outcomes: [{ column: 'Y', values: x.y }],
    offer: col('Z', x.z),
    treatment: col('D', x.d),
    propensity: { deltas: [0.1], aps: [x.aps] },
    ...extra,
  };
}

describe('APS estimate = 2SLS of the regression core on the 0 < APS < 1 sample', () => {
  const x = data(11, 900);
  const rows = boundaryRows(x);
  const core = {
    outcome: col('Y', pick(x.y, rows)),
    endogenous: col('D', pick(x.d, rows)),
    instrument: col('Z', pick(x.z, rows)),
    controls: [col('APS', pick(x.aps, rows)), col('W', pick(x.w, rows))],
  };
  for (const clustered of [false, true]) {
    const label = clustered ? 'CR1' : 'HC1';
    it(`${label}: estimate, SE, first stage, F, reduced form, tF and Anderson–Rubin set match tsls.ts / weak-iv.ts to 1e-10`, () => {
      const result = estimateApsIv(input(x, { controls: [col('W', x.w)], ...(clustered ? { clusters: x.g } : {}) }));
      const b = result.outcomes[0]!.byDelta[0]!;
      const options = clustered ? { clusters: rows.map((i) => x.g[i]!) } : {};
      // the Anderson–Rubin set with the t(22) critical value is weak-iv.ts's normal-based set at
      // the level whose normal critical value equals it
      const arLevel = clustered ? 1 - 2 * normalCdf(-tCritical(0.95, 22), 0, 1) : 0.95;
      const ref = weakInstrumentChecks(core, options);
      const refAr = andersonRubinSet(core, { ...options, level: arLevel });
      const effect = ref.tsls.coefficients.find((c) => c.name === 'D')!;
      const fs = ref.tsls.firstStages[0]!.fit.coefficients.find((c) => c.name === 'Z')!;
      const rf = ref.tsls.reducedForm.coefficients.find((c) => c.name === 'Z')!;
      expect(b.n).toBe(rows.length);
      expect(b.variance).toBe(label);
      expect(b.clusters).toBe(clustered ? 23 : null);
      expect(b.estimable).toBe(true);
      expect(b.estimate! / effect.estimate).toBeCloseTo(1, 10);
      expect(b.se! / effect.se).toBeCloseTo(1, 10);
      // CR1 with G = 23 clusters refers the Wald t to t(22) (student-t.ts; Cameron, Gelbach &
      // Miller 2008); HC1 to the normal, as tsls.ts does.
      const crit = clustered ? tCritical(0.95, 22) : 1.959963984540054;
      expect(b.referenceDf).toBe(clustered ? 22 : null);
      expect(b.ci![0]).toBeCloseTo(effect.estimate - crit * effect.se, 9);
      expect(b.ci![1]).toBeCloseTo(effect.estimate + crit * effect.se, 9);
      expect(b.p!).toBeCloseTo(clustered ? twoSidedTP(effect.estimate / effect.se, 22) : effect.p, 10);
      if (!clustered) expect(b.ci![0]).toBeCloseTo(effect.ci[0], 9);
      expect(b.firstStage!.coef / fs.estimate).toBeCloseTo(1, 10);
      expect(b.firstStage!.se / fs.se).toBeCloseTo(1, 10);
      expect(b.firstStage!.F / ref.firstStageF).toBeCloseTo(1, 10);
      expect(b.reducedForm!.coef / rf.estimate).toBeCloseTo(1, 10);
      expect(b.reducedForm!.se / rf.se).toBeCloseTo(1, 10);
      expect(b.tfCi![0]!).toBeCloseTo(ref.tF.interval[0]!, 9);
      expect(b.tfCi![1]!).toBeCloseTo(ref.tF.interval[1]!, 9);
      expect(b.arShape).toBe(refAr.kind);
      expect(b.arCi!.length).toBe(refAr.intervals.length);
      b.arCi!.forEach(([lo, hi], j) => {
        expect(lo!).toBeCloseTo(refAr.intervals[j]![0]!, 9);
        expect(hi!).toBeCloseTo(refAr.intervals[j]![1]!, 9);
      });
      expect(b.controls).toEqual(['APS', 'W']);
      expect(b.weakInstrument).toBe(false);
    });
  }

  it('two outcomes share the sample and each matches its own 2SLS', () => {
    const result = estimateApsIv(input(x, { outcomes: [{ column: 'Y', values: x.y }, { column: 'Y2', label: 'Second outcome', values: x.y2 }] }));
    const second = result.outcomes[1]!;
    expect(second.label).toBe('Second outcome');
    const ref = tsls({ outcome: col('Y2', pick(x.y2, rows)), endogenous: [col('D', pick(x.d, rows))], instruments: [col('Z', pick(x.z, rows))], controls: [col('APS', pick(x.aps, rows))] });
    const effect = ref.coefficients.find((c) => c.name === 'D')!;
    expect(second.byDelta[0]!.estimate! / effect.estimate).toBeCloseTo(1, 10);
    expect(second.byDelta[0]!.se! / effect.se).toBeCloseTo(1, 10);
  });

  it('treatmentPer reports the effect per that many units of an amount-valued treatment', () => {
    const amount = column(x.n, (i) => 250 * x.d[i]! + 10 * x.w[i]! ** 2);
    const base = estimateApsIv(input(x, { treatment: col('AMOUNT', amount) })).outcomes[0]!;
    const per = estimateApsIv(input(x, { treatment: col('AMOUNT', amount), treatmentPer: 1000 }));
    const b0 = base.byDelta[0]!;
    const b1 = per.outcomes[0]!.byDelta[0]!;
    expect(b1.estimate! / b0.estimate!).toBeCloseTo(1000, 8);
    expect(b1.se! / b0.se!).toBeCloseTo(1000, 8);
    expect(b1.firstStage!.coef / b0.firstStage!.coef).toBeCloseTo(1 / 1000, 8);
    expect(b1.firstStage!.F).toBeCloseTo(b0.firstStage!.F, 8);
    expect(per.outcomes[0]!.naiveOls.estimate! / base.naiveOls.estimate!).toBeCloseTo(1000, 8);
    expect(per.estimandNote).toMatch(/per 1000 of it/);
  });
});

describe('exact identities', () => {
  it('pure lottery (constant APS): the APS is dropped as collinear with the intercept, named, and the estimate is the Wald ratio (Wald 1940; Angrist & Pischke 2009, §4.1)', () => {
    const r = rng(5);
    const n = 500;
    const aps = new Float64Array(n).fill(0.4);
    const z = column(n, () => (r.uniform() < 0.4 ? 1 : 0));
    const d = column(n, (i) => (r.uniform() < 0.1 + 0.7 * z[i]! ? 1 : 0));
    const y = column(n, (i) => 3 * d[i]! + r.normal());
    const result = estimateApsIv({ outcomes: [{ column: 'Y', values: y }], offer: col('Z', z), treatment: col('D', d), propensity: { deltas: [0.1], aps: [aps] } });
    const b = result.outcomes[0]!.byDelta[0]!;
    const mean = (v: Float64Array, g: number) => {
      let s = 0;
      let c = 0;
      for (let i = 0; i < n; i++) if (z[i] === g) (s += v[i]!), c++;
      return s / c;
    };
    expect(b.estimate!).toBeCloseTo((mean(y, 1) - mean(y, 0)) / (mean(d, 1) - mean(d, 0)), 12);
    expect(b.dropped).toEqual(['APS']);
    expect(b.controls).toEqual([]);
    expect(b.warnings.find((w) => w.code === 'collinear-dropped')!.message).toMatch(/"APS" was dropped: it is a linear combination of the intercept/);
    // Over all units with no controls, the IV without the APS is the same Wald ratio.
    expect(result.outcomes[0]!.ivNoControl.estimate!).toBeCloseTo(b.estimate!, 12);
  });

  it('naive OLS of Y on a binary D is the difference in means over all units, with the HC1 SE of ols.ts', () => {
    const x = data(12, 400);
    const o = estimateApsIv(input(x)).outcomes[0]!;
    let s1 = 0;
    let s0 = 0;
    let n1 = 0;
    for (let i = 0; i < x.n; i++) x.d[i] ? ((s1 += x.y[i]!), n1++) : (s0 += x.y[i]!);
    expect(o.naiveOls.estimate!).toBeCloseTo(s1 / n1 - s0 / (x.n - n1), 12);
    expect(o.naiveOls.n).toBe(x.n);
    expect(o.naiveOls.se!).toBeCloseTo(ols(col('y', x.y), [col('D', x.d)]).coefficients[1]!.se, 12);
  });

  it('without a treatment column the estimate is the reduced form (the offer’s effect) and says so', () => {
    const x = data(13, 600);
    const result = estimateApsIv(input(x, { treatment: undefined }));
    const b = result.outcomes[0]!.byDelta[0]!;
    const rows = boundaryRows(x);
    const rf = ols(col('Y', pick(x.y, rows)), [col('APS', pick(x.aps, rows)), col('Z', pick(x.z, rows))]).coefficients.find((c) => c.name === 'Z')!;
    expect(result.estimand).toBe('offer');
    expect(result.estimandNote).toMatch(/effect of the offer itself/);
    expect(b.estimate!).toBeCloseTo(rf.estimate, 12);
    expect(b.se!).toBeCloseTo(rf.se, 12);
    expect(b.firstStage).toBeNull();
    // D = Z: the Anderson–Rubin set is the Wald interval itself.
    expect(b.arCi).toEqual([b.ci]);
    expect(result.outcomes[0]!.naiveOls.estimate!).toBeCloseTo(ols(col('Y', x.y), [col('Z', x.z)]).coefficients[1]!.estimate, 12);
  });
});

describe('Anderson–Rubin set through the headline estimator', () => {
  it('strong instrument: close to the Wald interval (both ≈ β ± 1.96·se when F is large)', () => {
    const x = data(21, 4000, 0.7);
    const b = estimateApsIv(input(x)).outcomes[0]!.byDelta[0]!;
    expect(b.firstStage!.F).toBeGreaterThan(500);
    expect(b.arShape).toBe('interval');
    const [lo, hi] = b.arCi![0]!;
    const width = b.ci![1] - b.ci![0];
    expect(Math.abs(lo! - b.ci![0]) / width).toBeLessThan(0.05);
    expect(Math.abs(hi! - b.ci![1]) / width).toBeLessThan(0.05);
  });

  it('irrelevant instrument: unbounded set, a weak-instrument warning and an unbounded tF interval', () => {
    const x = data(22, 800, 0);
    const b = estimateApsIv(input(x)).outcomes[0]!.byDelta[0]!;
    expect(b.firstStage!.F).toBeLessThan(3.84);
    expect(['two-rays', 'whole-line']).toContain(b.arShape);
    expect(b.arCi!.flat()).toContain(null);
    expect(b.tfCi).toEqual([null, null]);
    expect(b.weakInstrument).toBe(true);
    expect(b.warnings.map((w) => w.code)).toEqual(expect.arrayContaining(['weak-instrument', 'ar-unbounded']));
  });
});

describe('bad situations get words, not crashes', () => {
  const x = data(31, 600);

  it('no unit with 0 < APS < 1 at a delta', () => {
    const result = estimateApsIv(input(x, { propensity: { deltas: [0.05, 0.1], aps: [x.aps.map((p) => (p > 0.5 ? 1 : 0)), x.aps] } }));
    const [none, some] = result.outcomes[0]!.byDelta;
    expect(none!.estimable).toBe(false);
    expect(none!.estimate).toBeNull();
    expect(none!.warnings).toEqual([{ code: 'no-boundary-units', message: "No units sit near the formula's edge at delta 0.05: try a larger delta or check the scales." }]);
    expect(some!.estimable).toBe(true);
    expect(result.warnings.some((w) => w.code === 'no-boundary-units')).toBe(true);
  });

  it('no variation in the offer, or in take-up, among boundary units', () => {
    const allOffered = estimateApsIv(input(x, { offer: col('Z', x.aps.map((p) => (p > 0 && p < 1 ? 1 : 0))) })).outcomes[0]!.byDelta[0]!;
    expect(allOffered.estimable).toBe(false);
    expect(allOffered.warnings.map((w) => w.code)).toEqual(['no-offer-variation']);
    expect(allOffered.warnings[0]!.message).toMatch(/were offered the benefit, so the offer's effect cannot be estimated/);

    const noTakeUp = estimateApsIv(input(x, { treatment: col('D', new Float64Array(x.n)) })).outcomes[0]!.byDelta[0]!;
    expect(noTakeUp.estimable).toBe(false);
    expect(noTakeUp.reducedForm).not.toBeNull();
    expect(noTakeUp.warnings.map((w) => w.code)).toContain('no-takeup-variation');
  });

  it('fewer than 50 boundary units, fewer than 10 on a side', () => {
    const small = data(32, 60);
    const b = estimateApsIv(input(small)).outcomes[0]!.byDelta[0]!;
    expect(b.n).toBeLessThan(50);
    expect(b.warnings.map((w) => w.code)).toContain('few-boundary-units');
    const fewOffered = x.z.map((v, i) => (v === 1 && i % 50 !== 0 ? 0 : v));
    const c = estimateApsIv(input(x, { offer: col('Z', fewOffered) })).outcomes[0]!.byDelta[0]!;
    expect(c.offered).toBeLessThan(10);
    expect(c.warnings.map((w) => w.code)).toContain('few-per-side');
  });

  it('a singular design names the column: a control that copies another is dropped with a warning', () => {
    const b = estimateApsIv(input(x, { controls: [col('W', x.w), col('W_TWICE', x.w.map((v) => 2 * v))] })).outcomes[0]!.byDelta[0]!;
    expect(b.dropped).toEqual(['W_TWICE']);
    expect(b.warnings.find((w) => w.code === 'collinear-dropped')!.message).toMatch(/"W_TWICE" was dropped: it is a linear combination of "W"/);
  });

  it('missing outcomes are excluded and counted per outcome', () => {
    const y = x.y.map((v, i) => (i % 7 === 0 ? NaN : v));
    const result = estimateApsIv(input(x, { outcomes: [{ column: 'Y', values: y }, { column: 'Y2', values: x.y2 }] }));
    const expected = [...Array(x.n).keys()].filter((i) => i % 7 === 0).length;
    expect(result.outcomes[0]!.missing).toBe(expected);
    expect(result.outcomes[1]!.missing).toBe(0);
    expect(result.outcomes[0]!.naiveOls.n).toBe(x.n - expected);
    expect(result.outcomes[0]!.byDelta[0]!.n).toBe(boundaryRows(x).filter((i) => i % 7 !== 0).length);
    expect(result.warnings.find((w) => w.code === 'missing-outcome')!.message).toBe(`Outcome "Y": ${expected} unit(s) have no value; they are left out of its estimates.`);
  });

  it('a missing take-up value is excluded and counted, never silently dropped', () => {
    const d = x.d.map((v, i) => (i === 3 ? NaN : v));
    const result = estimateApsIv(input(x, { treatment: col('D', d) }));
    expect(result.warnings.find((w) => w.code === 'missing-treatment')!.message).toMatch(/"D" has no value for 1 unit/);
    expect(result.outcomes[0]!.naiveOls.n).toBe(x.n - 1);
  });

  it('input errors: an offer that is not 0/1, mismatched lengths, a bad treatmentPer', () => {
    expect(inputErrorOf(() => estimateApsIv(input(x, { offer: col('Z', x.z.map((v, i) => (i === 4 ? 0.5 : v))) }))).message).toMatch(
      /must be 1 \(offered\) or 0 \(not offered\) for every unit; unit 5 has 0.5/,
    );
    expect(inputErrorOf(() => estimateApsIv(input(x, { outcomes: [{ column: 'Y', values: x.y.subarray(1) }] }))).code).toBe('length-mismatch');
    expect(inputErrorOf(() => estimateApsIv(input(x, { treatmentPer: 0 }))).message).toMatch(/treatmentPer must be a positive number/);
  });

  it('a single cluster among boundary units falls back to HC1 and says so', () => {
    const g = x.aps.map((p, i) => (p > 0 && p < 1 ? 1 : i));
    const b = estimateApsIv(input(x, { clusters: g })).outcomes[0]!.byDelta[0]!;
    expect(b.variance).toBe('HC1');
    expect(b.warnings.map((w) => w.code)).toContain('few-clusters');
  });
});

describe('the AR quadratic of the headline estimator agrees with andersonRubinSet with controls', () => {
  it('HC1 with a control', () => {
    const x = data(41, 700, 0.15);
    const rows = boundaryRows(x);
    const b = estimateApsIv(input(x, { controls: [col('W', x.w)] })).outcomes[0]!.byDelta[0]!;
    const ar = andersonRubinSet({
      outcome: col('Y', pick(x.y, rows)),
      endogenous: col('D', pick(x.d, rows)),
      instrument: col('Z', pick(x.z, rows)),
      controls: [col('APS', pick(x.aps, rows)), col('W', pick(x.w, rows))],
    });
    expect(b.arShape).toBe(ar.kind);
    b.arCi!.flat().forEach((v, j) => {
      const ref = ar.intervals.flat()[j]!;
      if (v === null) expect(ref).toBeNull();
      else expect(v).toBeCloseTo(ref!, 8);
    });
  });
});
