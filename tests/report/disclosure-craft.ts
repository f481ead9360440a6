// Crafted results with small cells at many places, for the disclosure audit (disclosure-audit.ts).
// Starts from a real run's results and rewrites only its counts, keeping every relation the
// results obey (rows read = used + exclusions, n = offered + not offered, samples nested across
// deltas, …), with small values and small differences chosen by a seeded generator (Park and
// Miller 1988, minimal standard). The estimates stay as they were: the audit is about counts.

import type { Results } from '../../main/contract/results.ts';

function rng(seed: number) {
  let s = seed % 2147483647 || 1;
  return {
    next: () => { s = (s * 16807) % 2147483647; return s / 2147483647; },
    int(lo: number, hi: number) { return lo + Math.floor(this.next() * (hi - lo + 1)); },
  };
}

/** A copy of `base` whose counts hold small cells and small differences in many places. */
export function craftSmallCells(base: Results, seed: number): Results {
  const r: Results = JSON.parse(JSON.stringify(base));
  const g = rng(seed);
  // A count that is small about half the time, else a few hundred.
  const some = () => (g.next() < 0.5 ? g.int(1, 10) : g.int(11, 400));
  const small = () => (g.next() < 0.6 ? g.int(1, 10) : g.int(0, 30));

  const used = 2000 + g.int(0, 2000);
  r.study.rowsUsed = used;
  r.study.rowsExcluded = Array.from({ length: g.int(0, 4) }, (_, i) => ({ reason: `column ${String.fromCharCode(65 + i)} is blank`, count: some(), rows: [] }));
  r.study.rowsRead = used + r.study.rowsExcluded.reduce((s, e) => s + e.count, 0);
  if (r.fidelity) {
    const offeredAgainst = small();
    const refusedAgainst = small();
    r.fidelity = { ...r.fidelity, compared: used, disagree: offeredAgainst + refusedAgainst, agree: used - offeredAgainst - refusedAgainst, offeredAgainstRule: offeredAgainst, refusedAgainstRule: refusedAgainst, disagreeIds: [] };
  }
  // Nested samples: each larger delta adds a few (often small) units near the edge.
  const K = r.design.byDelta.length;
  let offered = g.int(5, 300);
  let notOffered = g.int(5, 300);
  let without = small();
  const atoms = r.design.composition[0]?.atoms.length ?? 0;
  let straddling = Array.from({ length: atoms }, () => g.int(0, 40));
  for (let k = 0; k < K; k++) {
    if (k > 0) {
      offered += small();
      notOffered += small();
      without += g.next() < 0.5 ? 0 : small();
      straddling = straddling.map((s) => s + small());
    }
    const n = offered + notOffered;
    const boundary = n + without;
    const d = r.design.byDelta[k]!;
    const simulated = Math.min(boundary, small());
    r.design.byDelta[k] = { ...d, boundary, exact: boundary - simulated, simulated, constant: used - boundary };
    const comp = r.design.composition[k];
    if (comp) {
      // Split the boundary into near-one-criterion-only units and "several", straddling ≥ only.
      const only = straddling.map((s) => Math.min(s, small()));
      let several = boundary - only.reduce((s, x) => s + x, 0);
      if (several < 0) { only.fill(0); several = boundary; }
      const strad = straddling.map((s, j) => Math.max(s, only[j]!));
      r.design.composition[k] = {
        ...comp, boundary, several, lotteryOnly: 0,
        atoms: comp.atoms.map((a, j) => ({ ...a, only: only[j]!, straddling: strad[j]!, share: boundary ? strad[j]! / boundary : 0 })),
      };
    }
    for (const o of r.outcomes) {
      const b = o.byDelta[k];
      if (b) Object.assign(b, { n, offered, notOffered });
    }
  }
  for (const o of r.outcomes) {
    o.missing = small();
    o.naiveOls = { ...o.naiveOls, n: used - o.missing };
  }
  // Threshold changes: per limit and direction, nested switchers with small differences.
  const tc = r.thresholdChanges;
  if (tc) {
    const groups = new Map<string, number[]>();
    tc.scenarios.forEach((s, i) => {
      const key = `${s.path} ${Math.sign(s.relativeChange)}`;
      groups.set(key, [...(groups.get(key) ?? []), i]);
    });
    for (const idx of groups.values()) {
      idx.sort((a, b) => Math.abs(tc.scenarios[a]!.relativeChange) - Math.abs(tc.scenarios[b]!.relativeChange));
      let sw = small();
      let out = g.next() < 0.5 ? 0 : small();
      for (const i of idx) {
        const s = tc.scenarios[i]!;
        Object.assign(s, { switchers: sw + out, switchersOutsideBand: out });
        sw += small();
        out += g.next() < 0.5 ? 0 : small();
      }
    }
  }
  return r;
}
