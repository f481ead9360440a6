// Small helpers shared by the figure-data modules (figure-data.ts, boundary-map.ts): which inputs
// an expression reads, quantiles, round axis ranges, number text. Pure.

import type { CompiledProgram, IrNode } from '../rules/ir.ts';
import type { AxisVariable } from './model/figure-types.ts';

/** Does an expression read continuous input i? */
export function mentions(node: IrNode, i: number): boolean {
  switch (node.k) {
    case 'const': case 'disc': return false;
    case 'cont': return node.i === i;
    case 'neg': return mentions(node.a, i);
    case 'min': case 'max': return node.args.some((a) => mentions(a, i));
    case 'lookup': return [...node.table.values()].some((a) => mentions(a, i)) || (node.otherwise !== null && mentions(node.otherwise, i));
    default: return mentions(node.a, i) || mentions(node.b, i);
  }
}

/** Linear interpolation between order statistics (Hyndman & Fan 1996, definition 7). */
export function quantile(sorted: Float64Array, q: number): number {
  if (!sorted.length) return NaN;
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo]! + (sorted[hi]! - sorted[lo]!) * (pos - lo);
}

export function sortedFinite(values: ArrayLike<number>, keep: (r: number) => boolean): Float64Array {
  const out: number[] = [];
  for (let r = 0; r < values.length; r++) if (keep(r) && Number.isFinite(values[r]!)) out.push(values[r]!);
  return Float64Array.from(out).sort();
}

export function edges(lo: number, hi: number, cells: number): number[] {
  return Array.from({ length: cells + 1 }, (_, i) => lo + ((hi - lo) * i) / cells);
}

export function variableAxis(program: CompiledProgram, j: number): AxisVariable {
  const v = program.continuous[j]!.variable;
  return { key: v.key, label: v.label ?? v.key, ...(v.unit ? { unit: v.unit } : {}) };
}

/** The smallest of 1, 2, 2.5, 5 × 10^k at least x (round axis steps; common practice). */
export function niceStep(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 1;
  const p = Math.pow(10, Math.floor(Math.log10(x)));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= x * (1 - 1e-12)) return m * p;
  return 10 * p;
}

/** [lo, hi] widened to multiples of a round step (about a tenth of the range). */
export function niceRange(lo: number, hi: number): [number, number] {
  const step = niceStep((hi - lo) / 10);
  return [Math.floor(lo / step) * step, Math.ceil(hi / step) * step];
}

export const fmt = (v: number): string => v.toLocaleString('en-US', { maximumSignificantDigits: 4 });
