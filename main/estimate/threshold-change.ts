// Small threshold changes: what if a limit of the formula moved by ±1% or ±5%?
//
// For each numeric limit (a number, an arithmetic limit, or one entry of a lookup table), the
// rule is re-evaluated with the limit scaled — by lowering a modified copy of the program through
// the compiler (compileProgram), so the same validation and evaluator decide eligibility — and
// the units whose verdict changes are counted. The projected changes follow from the estimates:
//   offers:          S = Σ_i ΔA(x_i) = (ifEligible − ifIneligible)·(newly eligible − newly ineligible)
//   take-up:         γ₁·S, γ₁ the first stage (the offer's effect on take-up);
//   outcome total:   β₁·γ₁·S = ρ₁·S, since with one instrument and the same controls the 2SLS
//                    estimate is β₁ = ρ₁/γ₁ (indirect least squares), ρ₁ the reduced form; the
//                    interval is therefore exact from ρ₁'s: (ρ₁ ± z·se(ρ₁))·S, no delta method.
// These are valid only while every switcher lies inside the boundary band of the chosen delta
// (0 < APS < 1): the estimates describe units near the edge, and say nothing about units the
// change would reach beyond it. The result says so (`valid`, `validity`).

import { compileProgram } from '../rules/compile.ts';
import { atomColumns, verdictsFromAtoms } from '../rules/atoms.ts';
import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';
import type { Condition, ExprSource, LookupLimit, Program } from '../rules/types.ts';
import { normalCritical } from './inference.ts';
import { formatNumber } from './subset.ts';
import type { EstimateWarning } from './types.ts';

export const DEFAULT_CHANGES: readonly number[] = [-0.05, -0.01, 0.01, 0.05];

export interface ThresholdEstimate {
  column: string;
  /** First stage γ₁ (null when not estimated). */
  firstStage: { coef: number; se: number } | null;
  /** True when no treatment column was given: take-up is the offer itself (γ₁ = 1 exactly). */
  takeUpIsOffer?: boolean;
  /** Reduced form ρ₁ (null when not estimable). */
  reducedForm: { coef: number; se: number } | null;
}

export interface ThresholdChangeInput {
  program: CompiledProgram;
  columns: DesignColumns;
  /** The chosen delta and the APS there (defines the boundary band). */
  delta: number;
  aps: Float64Array;
  estimates: readonly ThresholdEstimate[];
  /** Relative changes of each limit (default ±1%, ±5%). */
  changes?: readonly number[];
  /** 1 = unit counted (default: all). */
  include?: Uint8Array;
  level?: number;
}

export interface Projection {
  estimate: number;
  ci: [number, number];
}

export interface ScenarioOutcome {
  column: string;
  /** In units of the treatment as estimated (per `treatmentPer` when given). */
  takeUpChange: Projection | null;
  outcomeTotalChange: Projection | null;
}

export interface LimitScenario {
  /** JSON path of the limit, e.g. program.rule.all[0].limit.table.2 */
  path: string;
  description: string;
  /** For a limit from a table: the group it applies to ("size = 2", "other values of size"). */
  group?: string;
  original: ExprSource;
  changed: ExprSource;
  relativeChange: number;
  switchers: number;
  newlyEligible: number;
  newlyIneligible: number;
  /** Expected change in the number of offers, S. */
  offerChange: number;
  /** Switchers with APS 0 or 1 at the chosen delta (outside the boundary band). */
  switchersOutsideBand: number;
  /** True when every switcher lies inside the boundary band. */
  valid: boolean;
  validity: string;
  outcomes: ScenarioOutcome[];
}

export interface ThresholdChangeResult {
  delta: number;
  scenarios: LimitScenario[];
  warnings: EstimateWarning[];
}

interface LimitSlot {
  path: string;
  description: string;
  group?: string;
  get: () => ExprSource;
  set: (v: ExprSource) => void;
}

/** Every numeric limit of a rule, in a fixed order (the same for a copy of the rule). */
export function collectLimits(rule: Condition, path: string): LimitSlot[] {
  const out: LimitSlot[] = [];
  const walk = (c: Condition, p: string): void => {
    if ('all' in c) return c.all.forEach((x, i) => walk(x, `${p}.all[${i}]`));
    if ('any' in c) return c.any.forEach((x, i) => walk(x, `${p}.any[${i}]`));
    if ('atLeast' in c) return c.of.forEach((x, i) => walk(x, `${p}.of[${i}]`));
    if ('not' in c) return walk(c.not, `${p}.not`);
    if ('in' in c) return;
    const what = c.label ?? String(c.value);
    if (typeof c.limit === 'object') {
      const lookup: LookupLimit = c.limit;
      for (const key of Object.keys(lookup.table)) {
        out.push({
          path: `${p}.limit.table.${key}`,
          description: `limit on ${what} for ${lookup.by} = ${key}`,
          group: `${lookup.by} = ${key}`,
          get: () => lookup.table[key]!,
          set: (v) => {
            lookup.table[key] = v;
          },
        });
      }
      if (lookup.else !== undefined) {
        out.push({
          path: `${p}.limit.else`,
          description: `limit on ${what} for other values of ${lookup.by}`,
          group: `other values of ${lookup.by}`,
          get: () => lookup.else!,
          set: (v) => {
            lookup.else = v;
          },
        });
      }
      return;
    }
    out.push({
      path: `${p}.limit`,
      description: `limit on ${what}`,
      get: () => c.limit as ExprSource,
      set: (v) => {
        c.limit = v;
      },
    });
  };
  walk(rule, path);
  return out;
}

function scaledSource(src: ExprSource, factor: number): ExprSource {
  return typeof src === 'number' ? src * factor : `(${src}) * ${factor}`;
}

export function thresholdChanges(input: ThresholdChangeInput): ThresholdChangeResult {
  const { program, columns: cols, aps, delta } = input;
  const n = cols.n;
  const critical = normalCritical(input.level ?? 0.95);
  const changes = input.changes ?? DEFAULT_CHANGES;
  const warnings: EstimateWarning[] = [];
  // The atoms of the rule as it is, evaluated once: each scenario moves one limit, so it
  // re-evaluates only the atom(s) that limit is part of (atomColumns with `reuse`).
  const baseAtoms = atomColumns(program, cols);
  const base = verdictsFromAtoms(program, baseAtoms, n);
  // 1 = the unit is counted: included, and the rule as it is can be evaluated for it.
  const counted = new Uint8Array(n);
  for (let i = 0; i < n; i++) counted[i] = !input.include || input.include[i] === 1 ? 1 : 0;
  for (const i of base.undefinedRows) counted[i] = 0;
  const gap = program.offer.ifEligible - program.offer.ifIneligible;
  const slots = collectLimits(program.program.rule, 'program.rule');
  const scenarios: LimitScenario[] = [];

  slots.forEach((slot, s) => {
    for (const r of changes) {
      const factor = 1 + r;
      const copy = JSON.parse(JSON.stringify(program.program)) as Program;
      const target = collectLimits(copy.rule, 'program.rule')[s]!;
      const changed = scaledSource(slot.get(), factor);
      target.set(changed);
      const compiled = compileProgram(copy);
      if (!compiled.ok) {
        warnings.push({
          code: 'threshold-change-invalid',
          message: `Moving the ${slot.description} (${slot.path}) by ${formatNumber(r * 100)}% gives a formula that cannot be evaluated (${compiled.problems[0]?.message ?? 'unknown problem'}); that scenario is skipped.`,
        });
        continue;
      }
      const next = verdictsFromAtoms(compiled.value, atomColumns(compiled.value, cols, baseAtoms), n);
      const countedNow = counted.slice();
      for (const i of next.undefinedRows) countedNow[i] = 0;
      let newlyEligible = 0;
      let newlyIneligible = 0;
      let outside = 0;
      const before = base.eligible, after = next.eligible; // locals: the loop runs over every unit for each scenario
      for (let i = 0; i < n; i++) {
        if (countedNow[i] === 0) continue;
        const a = before[i]!;
        const b = after[i]!;
        if (a === b) continue;
        if (b) newlyEligible++;
        else newlyIneligible++;
        const p = aps[i]!;
        if (!(p > 0 && p < 1)) outside++;
      }
      const switchers = newlyEligible + newlyIneligible;
      const offerChange = gap * (newlyEligible - newlyIneligible);
      const valid = outside === 0;
      const validity = valid
        ? switchers === 0
          ? `No unit changes eligibility.`
          : `All ${switchers} units that change eligibility lie inside the boundary band at delta ${delta}, where the estimates apply.`
        : `${outside} of the ${switchers} units that change eligibility lie outside the boundary band at delta ${delta}; the estimates describe units near the formula's edge only, so this projection is not supported by the data. Use a larger delta or a smaller change.`;
      scenarios.push({
        path: slot.path,
        description: slot.description,
        ...(slot.group !== undefined ? { group: slot.group } : {}),
        original: slot.get(),
        changed,
        relativeChange: r,
        switchers,
        newlyEligible,
        newlyIneligible,
        offerChange,
        switchersOutsideBand: outside,
        valid,
        validity,
        outcomes: input.estimates.map((e) => ({
          column: e.column,
          takeUpChange: e.takeUpIsOffer
            ? { estimate: offerChange, ci: [offerChange, offerChange] }
            : e.firstStage
              ? project(e.firstStage, offerChange, critical)
              : null,
          outcomeTotalChange: e.reducedForm ? project(e.reducedForm, offerChange, critical) : null,
        })),
      });
    }
  });
  return { delta, scenarios, warnings };
}

function project(coef: { coef: number; se: number }, s: number, critical: number): Projection {
  const a = (coef.coef - critical * coef.se) * s;
  const b = (coef.coef + critical * coef.se) * s;
  return { estimate: coef.coef * s, ci: [Math.min(a, b), Math.max(a, b)] };
}
