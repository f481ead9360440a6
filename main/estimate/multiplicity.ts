// Several outcomes tested at once: Holm's (1979) step-down adjustment, which controls the
// probability of any false rejection among the m tests whatever their dependence (S. Holm, "A
// simple sequentially rejective multiple test procedure", Scand. J. Statist. 6:65–70).
// With p-values sorted p_(1) ≤ … ≤ p_(m), the adjusted values are
//   p̃_(i) = max_{j ≤ i} min(1, (m − j + 1)·p_(j))
// (Wright 1992, "Adjusted P-values for simultaneous inference", Biometrics 48:1005–1013), so that
// H_(i) is rejected by Holm's procedure at level α exactly when p̃_(i) ≤ α.

/** Holm-adjusted p-values in the input order. Non-numbers stay NaN and do not count in m. */
export function holmAdjust(p: readonly (number | null)[]): number[] {
  const order: number[] = [];
  p.forEach((v, i) => {
    if (v !== null && Number.isFinite(v)) order.push(i);
  });
  order.sort((a, b) => p[a]! - p[b]! || a - b);
  const m = order.length;
  const out = p.map(() => NaN);
  let running = 0;
  order.forEach((i, rank) => {
    const v = Math.min(1, (m - rank) * p[i]!);
    running = Math.max(running, v);
    out[i] = running;
  });
  return out;
}

/** Holm's sequentially rejective procedure as stated in Holm (1979): which hypotheses are rejected at level α. */
export function holmRejects(p: readonly number[], alpha: number): boolean[] {
  const order = p.map((_, i) => i).sort((a, b) => p[a]! - p[b]! || a - b);
  const m = p.length;
  const out = p.map(() => false);
  for (let rank = 0; rank < m; rank++) {
    const i = order[rank]!;
    if (p[i]! <= alpha / (m - rank)) out[i] = true;
    else break;
  }
  return out;
}

export interface HolmRow {
  column: string;
  delta: number;
  p: number | null;
  adjustedP: number | null;
}

/** At each delta, the outcomes' p-values adjusted together (the family is one delta's outcomes). */
export function holmByDelta(outcomes: readonly { column: string; byDelta: readonly { delta: number; p: number | null }[] }[]): HolmRow[] {
  const deltas = [...new Set(outcomes.flatMap((o) => o.byDelta.map((b) => b.delta)))];
  const rows: HolmRow[] = [];
  for (const delta of deltas) {
    const entries = outcomes.map((o) => ({ column: o.column, p: o.byDelta.find((b) => b.delta === delta)?.p ?? null }));
    const adjusted = holmAdjust(entries.map((e) => e.p));
    entries.forEach((e, j) => rows.push({ column: e.column, delta, p: e.p, adjustedP: Number.isNaN(adjusted[j]!) ? null : adjusted[j]! }));
  }
  return rows;
}
