// The propensity stage for a whole dataset, on the calling thread, in blocks (progress and
// cancellation between blocks). parallel/pool.ts runs the same blocks on worker threads; both
// give identical numbers because every unit's result depends only on its own inputs, the
// settings and the seed.

import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';
import type { Checked } from '../rules/types.ts';
import {
  allocateApsColumns, computeApsBlock, placeBlock, sliceColumns,
  METHOD_CONSTANT, METHOD_EXACT, METHOD_EXACT_CORNER, METHOD_SIMULATED, METHOD_UNDEFINED, REFINED_AT_BOUND,
  type ApsColumns, type ApsSettings,
} from './aps.ts';
import { ballPointSet, type BallPointSet } from './ball-points.ts';
import { Cancelled } from './cancelled.ts';
import { validateSettings } from './settings.ts';
import { resolveScales, type VariableScale } from './scaling.ts';

export interface Progress { stage: string; done: number; total: number }

export interface PropensityOptions {
  onProgress?: (p: Progress) => void;
  signal?: { readonly aborted: boolean };
  blockSize?: number;
}

export interface DeltaSummary {
  delta: number;
  constant: number;
  /** Exact in closed form or by numerical integration (exact corners included). */
  exact: number;
  simulated: number;
  undefined: number;
  /** Units with 0 < APS < 1. */
  boundary: number;
  /** Largest stated error among simulated units and exact corners (0 if none). */
  maxSe: number;
  /** Corner units: an APS strictly between the rule's two offer probabilities and two or more criteria crossing the ball. */
  corner: number;
  /** Corner units whose APS was computed exactly (parallel normals in closed form, or an exact corner). */
  cornerExact: number;
  /** Simulated units whose first estimate was exactly 0 or 1 and that were given more points. */
  refined: number;
  /** Of those, units still at exactly 0 or 1 after the largest number of points. */
  refinedAtBound: number;
  /** For each atom: boundary units whose ball it crosses (which criterion identifies the estimate). */
  straddlingByAtom: number[];
}

export interface PropensityResult extends ApsColumns {
  scales: VariableScale[];
  settings: ApsSettings;
  /** Points actually used per simulated unit (replicates × per replicate). */
  drawsUsed: number;
  replicates: number;
  /** Conservative Monte Carlo bound on a simulated APS's standard deviation, |q1 − q0|·0.5/√S (METHOD.md §1). */
  mcSdBound: number;
  summary: DeltaSummary[];
}

export { Cancelled };

export const DEFAULT_BLOCK = 16_384;

export { validateSettings };

export function summarize(program: CompiledProgram, result: ApsColumns): DeltaSummary[] {
  return result.deltas.map((delta, k) => {
    const counts = [0, 0, 0, 0, 0];
    let boundary = 0;
    let maxSe = 0;
    let corner = 0;
    let cornerExact = 0;
    let refined = 0;
    let refinedAtBound = 0;
    const refinedCol = result.refined[k]!;
    const straddlingByAtom = program.atoms.map(() => 0);
    const aps = result.aps[k]!;
    const method = result.method[k]!;
    const straddle = result.straddle[k]!;
    const se = result.se[k]!;
    for (let r = 0; r < result.n; r++) {
      const m = method[r]!;
      counts[m]!++;
      if ((m === METHOD_SIMULATED || m === METHOD_EXACT_CORNER) && se[r]! > maxSe) maxSe = se[r]!;
      if (refinedCol[r]) { refined++; if (refinedCol[r]! & REFINED_AT_BOUND) refinedAtBound++; }
      if (m !== METHOD_CONSTANT && m !== METHOD_UNDEFINED && popcount(straddle[r]!) >= 2) {
        corner++;
        if (m === METHOD_EXACT || m === METHOD_EXACT_CORNER) cornerExact++;
      }
      const p = aps[r]!;
      if (p > 0 && p < 1) {
        boundary++;
        const mask = straddle[r]!;
        if (mask) for (let a = 0; a < straddlingByAtom.length && a < 32; a++) if (mask & (1 << a)) straddlingByAtom[a]!++;
      }
    }
    return {
      delta,
      constant: counts[METHOD_CONSTANT]!,
      exact: counts[METHOD_EXACT]! + counts[METHOD_EXACT_CORNER]!,
      simulated: counts[METHOD_SIMULATED]!,
      undefined: counts[METHOD_UNDEFINED]!,
      boundary,
      maxSe,
      straddlingByAtom,
      corner,
      cornerExact,
      refined,
      refinedAtBound,
    };
  });
}

function popcount(x: number): number {
  let c = 0;
  for (let v = x >>> 0; v; v &= v - 1) c++;
  return c;
}

/** Everything a block computation needs besides its rows; plain data, so it can cross to a worker. */
export interface PreparedDesign {
  scales: VariableScale[];
  points: BallPointSet;
}

export function prepareDesign(program: CompiledProgram, cols: DesignColumns, settings: ApsSettings): Checked<PreparedDesign> {
  const s = validateSettings(settings);
  if (!s.ok) return s;
  const scales = resolveScales(program, cols);
  if (!scales.ok) return scales;
  return { ok: true, value: { scales: scales.value, points: ballPointSet(program.continuous.length, settings.draws, settings.seed) } };
}

export function finishResult(program: CompiledProgram, columns: ApsColumns, prepared: PreparedDesign, settings: ApsSettings): PropensityResult {
  const { ifEligible, ifIneligible } = program.offer;
  const drawsUsed = prepared.points.replicates * prepared.points.perReplicate;
  return {
    ...columns,
    scales: prepared.scales,
    settings: { deltas: settings.deltas.slice(), draws: settings.draws, seed: settings.seed },
    drawsUsed,
    replicates: prepared.points.replicates,
    mcSdBound: (Math.abs(ifEligible - ifIneligible) * 0.5) / Math.sqrt(drawsUsed),
    summary: summarize(program, columns),
  };
}

/** Single-threaded propensity stage. Throws Cancelled if the signal is raised. */
export function computePropensity(
  program: CompiledProgram,
  cols: DesignColumns,
  settings: ApsSettings,
  options: PropensityOptions = {},
): Checked<PropensityResult> {
  const prepared = prepareDesign(program, cols, settings);
  if (!prepared.ok) return prepared;
  const scaleValues = prepared.value.scales.map((s) => s.scale);
  const block = options.blockSize ?? DEFAULT_BLOCK;
  const out = allocateApsColumns(cols.n, settings.deltas);
  options.onProgress?.({ stage: 'propensity', done: 0, total: cols.n });
  for (let start = 0; start < cols.n; start += block) {
    if (options.signal?.aborted) throw new Cancelled();
    const end = Math.min(cols.n, start + block);
    placeBlock(out, computeApsBlock(program, sliceColumns(cols, start, end), scaleValues, settings, prepared.value.points), start);
    options.onProgress?.({ stage: 'propensity', done: end, total: cols.n });
  }
  return { ok: true, value: finishResult(program, out, prepared.value, settings) };
}
