// The approximate propensity score as the method is usually stated, for the benchmarks'
// comparisons (tests/bench/aps.bench.ts, evaluate.bench.ts): `draws` pseudo-random points uniform
// in every unit's ball (radius delta in scaled units, discrete inputs held fixed), the rule
// evaluated at each, the offer probability averaged (Narita and Yata, "Algorithm is Experiment",
// 2021: the APS as the mean of the offer over the delta-ball). One thread, no exact shortcuts:
// the brute force Fenceline's propensity stage is compared with.

import { cubeDimension, cubeToBall } from '../../main/design/ball-points.ts';
import { createRng } from '../../main/design/random.ts';
import { holds } from '../../main/rules/atoms.ts';
import { compilePoint } from '../../main/rules/evaluate-scalar.ts';
import type { CompiledProgram, DesignColumns } from '../../main/rules/ir.ts';
import { evalTree } from '../../main/rules/logic.ts';

/** Brute-force APS of every unit of `cols` at one delta (scales: one per continuous input). */
export function bruteForce(p: CompiledProgram, cols: DesignColumns, scales: number[], delta: number, draws: number, seed: number): Float64Array {
  const d = p.continuous.length;
  const margins = p.atoms.map((a) => (a.kind === 'compare' ? compilePoint(a.margin) : null));
  const rng = createRng(seed, 99);
  const v = new Float64Array(cubeDimension(d));
  const z = new Float64Array(d);
  const x = new Float64Array(d);
  const dv = new Float64Array(p.discrete.length);
  const state = new Uint8Array(p.atoms.length);
  const out = new Float64Array(cols.n);
  for (let r = 0; r < cols.n; r++) {
    for (let j = 0; j < dv.length; j++) dv[j] = cols.discrete[j]![r]!;
    let sum = 0;
    for (let s = 0; s < draws; s++) {
      for (let j = 0; j < v.length; j++) v[j] = rng.next();
      cubeToBall(v, d, z, 0);
      for (let j = 0; j < d; j++) x[j] = cols.continuous[j]![r]! + delta * scales[j]! * z[j]!;
      p.atoms.forEach((a, i) => {
        if (a.kind === 'member') state[i] = a.members.has(dv[a.disc]!) ? 1 : 0;
        else state[i] = holds(margins[i]!(x, dv), a.op) ? 1 : 0;
      });
      sum += evalTree(p.tree, state) ? p.offer.ifEligible : p.offer.ifIneligible;
    }
    out[r] = sum / draws;
  }
  return out;
}
