// Every count the memo prints, suppressed once, together (suppress.ts, docs/method.md §7).
//
// A count can be worked out from other printed counts wherever the memo prints an additive
// relation: rows read = rows used + each exclusion; recorded decisions compared = agreeing +
// differing; units near the edge at a delta = offered + not offered (+ those without the
// outcome); units near the edge = those near one criterion only (per criterion) + those near
// several. The ledger lists each count under its path in results.json and each relation, some
// with a member the memo never prints but a reader can compute (e.g. units near the edge
// without the outcome), then runs suppressCounts over all of them at once, so hiding a count in
// one table also hides what would give it away in another (the algorithm hides a member before
// a total, which is why rows read rather than rows used is withheld when only a few rows were
// excluded). Sections read the states by path;
// asking for a count that is not in the ledger is a fault (every printed count goes through it).

import type { Results } from '../../contract/results.ts';
import { dependentFigure, suppressCounts, type CellState, type CountRelation } from './suppress.ts';

export interface CountLedger {
  threshold: number;
  /** The suppression state of the count at a results.json path. */
  get(path: string): CellState;
  /** A share computed from counts: hidden when any of them is hidden. */
  share(value: number, ...paths: string[]): CellState;
}

interface Entry { key: string; value: number }

export function buildCountLedger(results: Results): CountLedger {
  const threshold = results.settings.smallCellMax;
  const entries: Entry[] = [];
  const index = new Map<string, number>();
  const relations: CountRelation[] = [];
  const add = (key: string, value: number): number => {
    const known = index.get(key);
    if (known !== undefined) return known;
    index.set(key, entries.length);
    entries.push({ key, value });
    return entries.length - 1;
  };
  /** A relation, kept only when it adds up (a total that does not is left to stand on its own). */
  const relate = (members: number[], total: number) => {
    const sum = members.reduce((s, i) => s + entries[i]!.value, 0);
    if (sum === entries[total]!.value) relations.push({ members, total });
  };
  /** A member a reader can compute as total − the printed members; never printed itself. */
  const gap = (key: string, total: number, printed: number[]) => {
    const rest = entries[total]!.value - printed.reduce((s, i) => s + entries[i]!.value, 0);
    if (rest < 0) return;
    relate([...printed, add(`derived:${key}`, rest)], total);
  };

  const s = results.study;
  const read = add('study.rowsRead', s.rowsRead);
  const used = add('study.rowsUsed', s.rowsUsed);
  const excluded = s.rowsExcluded.map((e, i) => add(`study.rowsExcluded[${i}].count`, e.count));
  // When the excluded rows add up to a small count, rows read and rows used together would give
  // it away. The memo is about the rows used, so rows read is withheld instead (it is in no other
  // relation, so withholding it is enough); otherwise the usual rules apply.
  const excludedTotal = s.rowsRead - s.rowsUsed;
  const withholdRead = excludedTotal >= 1 && excludedTotal <= threshold;
  if (!withholdRead) relate([used, ...excluded], read);
  s.joins.forEach((j, i) => {
    add(`study.joins[${i}].matched`, j.matched);
    add(`study.joins[${i}].unmatchedKeys.count`, j.unmatchedKeys.count);
    add(`study.joins[${i}].duplicateKeys.count`, j.duplicateKeys.count);
  });

  const f = results.fidelity;
  if (f) {
    const compared = add('fidelity.compared', f.compared);
    const agree = add('fidelity.agree', f.agree);
    const disagree = add('fidelity.disagree', f.disagree);
    relate([agree, disagree], compared);
    relate([add('fidelity.offeredAgainstRule', f.offeredAgainstRule), add('fidelity.refusedAgainstRule', f.refusedAgainstRule)], disagree);
    if (f.compared === s.rowsUsed) relate([compared], used); // the same count under two names
  }

  results.design.byDelta.forEach((d, k) => {
    const boundary = add(`design.byDelta[${k}].boundary`, d.boundary);
    const exact = add(`design.byDelta[${k}].exact`, d.exact);
    const simulated = add(`design.byDelta[${k}].simulated`, d.simulated);
    const constant = add(`design.byDelta[${k}].constant`, d.constant);
    relate([exact, simulated, constant], used);
    const comp = results.design.composition[k];
    if (comp && comp.boundary === d.boundary) {
      const only = comp.atoms.map((a, j) => {
        add(`design.composition[${k}].atoms[${j}].straddling`, a.straddling);
        return add(`design.composition[${k}].atoms[${j}].only`, a.only);
      });
      relate([...only, add(`design.composition[${k}].several`, comp.several), add(`design.composition[${k}].lotteryOnly`, comp.lotteryOnly)], boundary);
    }
    results.outcomes.forEach((o, i) => {
      const b = o.byDelta[k];
      if (!b || b.delta !== d.delta) return;
      const n = add(`outcomes[${i}].byDelta[${k}].n`, b.n);
      const offered = add(`outcomes[${i}].byDelta[${k}].offered`, b.offered);
      const notOffered = add(`outcomes[${i}].byDelta[${k}].notOffered`, b.notOffered);
      relate([offered, notOffered], n);
      // Units near the edge without this outcome: boundary − n, which a reader can compute.
      gap(`outcomes[${i}].byDelta[${k}].withoutOutcome`, boundary, [n]);
    });
  });

  // Nested samples (docs/method.md, "Disclosure control"): a ball of a larger radius crosses every
  // criterion a smaller one crosses, so the units near the edge at a smaller delta are among those
  // at the next larger one, and so are their offered and not-offered units, those with the outcome,
  // and those straddling each criterion; units whose offer probability is constant go the other way.
  // The difference between two such counts is itself a count of units a reader can compute; it goes
  // into the ledger as a member never printed, like the gaps above. Where simulated offer
  // probabilities break the nesting the difference can be negative; gap() then adds nothing.
  const order = results.design.byDelta.map((d, k) => ({ d: d.delta, k })).sort((a, b) => a.d - b.d).map((x) => x.k);
  const nest = (path: (k: number) => string | null, reverse = false) => {
    for (let j = 0; j + 1 < order.length; j++) {
      const [small, large] = reverse ? [order[j + 1]!, order[j]!] : [order[j]!, order[j + 1]!];
      const a = path(small);
      const b = path(large);
      if (a === null || b === null || !index.has(a) || !index.has(b)) continue;
      gap(`nested:${b} - ${a}`, index.get(b)!, [index.get(a)!]);
    }
  };
  nest((k) => `design.byDelta[${k}].boundary`);
  nest((k) => `design.byDelta[${k}].constant`, true);
  results.design.composition[0]?.atoms.forEach((_, j) => nest((k) => `design.composition[${k}].atoms[${j}].straddling`));
  results.outcomes.forEach((_, i) => {
    for (const field of ['n', 'offered', 'notOffered']) nest((k) => `outcomes[${i}].byDelta[${k}].${field}`);
  });

  results.outcomes.forEach((o, i) => {
    const missing = add(`outcomes[${i}].missing`, o.missing);
    const naive = add(`outcomes[${i}].naiveOls.n`, o.naiveOls.n);
    relate([naive, missing], used);
  });

  const scenarios = results.thresholdChanges?.scenarios ?? [];
  scenarios.forEach((sc, i) => {
    const sw = add(`thresholdChanges.scenarios[${i}].switchers`, sc.switchers);
    const outside = add(`thresholdChanges.scenarios[${i}].switchersOutsideBand`, sc.switchersOutsideBand);
    gap(`thresholdChanges.scenarios[${i}].switchersInsideBand`, sw, [outside]);
  });
  // Moving one limit further in the same direction switches every unit a smaller move switches
  // (and those of them outside the band): nested again, so their differences are counts too.
  scenarios.forEach((sc, i) => {
    const next = scenarios
      .map((x, j) => ({ x, j }))
      .filter(({ x }) => x.path === sc.path && Math.sign(x.relativeChange) === Math.sign(sc.relativeChange) && Math.abs(x.relativeChange) > Math.abs(sc.relativeChange))
      .sort((a, b) => Math.abs(a.x.relativeChange) - Math.abs(b.x.relativeChange))[0];
    if (!next) return;
    for (const field of ['switchers', 'switchersOutsideBand']) {
      const a = `thresholdChanges.scenarios[${i}].${field}`;
      const b = `thresholdChanges.scenarios[${next.j}].${field}`;
      gap(`nested:${b} - ${a}`, index.get(b)!, [index.get(a)!]);
    }
  });

  const states = suppressCounts(entries.map((e) => e.value), relations, threshold);
  if (withholdRead) states[read] = { shown: false, reason: 'derived' };
  const get = (path: string): CellState => {
    const i = index.get(path);
    if (i === undefined) throw new Error(`memo: the count results.${path} is printed but is not in the count ledger`);
    return states[i]!;
  };
  return {
    threshold,
    get,
    share: (value, ...paths) => dependentFigure(paths.map(get), value),
  };
}
