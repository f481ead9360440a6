// From mapped columns to the design stage's inputs: the rule's inputs as DesignColumns, units
// where the rule cannot be evaluated excluded with a reason naming the criterion, the
// instrument Z, and the fidelity of the recorded decisions to the formula. Pure.

import type { ExclusionReason, Fidelity, Warning } from '../contract/results.ts';
import { countText } from '../data/count-text.ts';
import type { MappedData } from '../data/map-columns.ts';
import type { CompiledProgram, DesignColumns, IrNode } from '../rules/ir.ts';
import { evalColumn } from '../rules/evaluate-columns.ts';
import { verdicts } from '../rules/atoms.ts';

const MAX_LISTED = 1000;

export interface PreparedUnits {
  data: MappedData;
  cols: DesignColumns;
  /** The instrument: offered (1) or not (0). */
  z: Float64Array;
  /** The rule's own verdict (1 eligible) and offer probability A(x), per unit. */
  eligible: Uint8Array;
  offerProbability: Float64Array;
  excludedByRule: ExclusionReason[];
  /** One per gap in a limit table (a value with no entry and no 'any other value'): the rows it excludes, named. */
  warnings: Warning[];
  fidelity: Fidelity | null;
  instrument: { source: 'formula' | 'recorded-decision'; note: string };
}

export function designColumns(program: CompiledProgram, data: MappedData, variableOrder: string[]): DesignColumns {
  const col = (key: string) => data.variables[variableOrder.indexOf(key)]!;
  return {
    n: data.n,
    continuous: program.continuous.map((v) => col(v.key)),
    discrete: program.discrete.map((v) => col(v.key)),
  };
}

/** Keep only units with keep[r] = 1, in every per-unit array of the mapped data. */
export function keepUnits(data: MappedData, keep: Uint8Array): MappedData {
  const idx: number[] = [];
  for (let r = 0; r < data.n; r++) if (keep[r]) idx.push(r);
  const f64 = (a: Float64Array) => Float64Array.from(idx, (r) => a[r]!);
  return {
    ...data,
    n: idx.length,
    ids: idx.map((r) => data.ids[r]!),
    rowNumbers: Int32Array.from(idx, (r) => data.rowNumbers[r]!),
    variables: data.variables.map(f64),
    outcomes: data.outcomes.map(f64),
    outcomeMissing: data.outcomes.map((o) => {
      const rows: number[] = [];
      let count = 0;
      for (const r of idx) if (Number.isNaN(o[r]!)) { count++; if (rows.length < MAX_LISTED) rows.push(data.rowNumbers[r]!); }
      return { count, rows };
    }),
    treatment: data.treatment ? f64(data.treatment) : null,
    decision: data.decision ? f64(data.decision) : null,
    cluster: data.cluster ? { codes: Int32Array.from(idx, (r) => data.cluster!.codes[r]!), labels: data.cluster.labels } : null,
    covariates: data.covariates.map(f64),
    controls: data.controls.map(f64),
  };
}

type LookupNode = Extract<IrNode, { k: 'lookup' }>;

/** The limit tables of a margin that have no "any other value" (only these can leave a unit without a limit). */
function tablesWithoutElse(node: IrNode, out: LookupNode[] = []): LookupNode[] {
  switch (node.k) {
    case 'const': case 'cont': case 'disc': return out;
    case 'neg': return tablesWithoutElse(node.a, out);
    case 'add': case 'sub': case 'mul': case 'div': tablesWithoutElse(node.a, out); return tablesWithoutElse(node.b, out);
    case 'min': case 'max': for (const a of node.args) tablesWithoutElse(a, out); return out;
    case 'lookup':
      if (node.otherwise === null) out.push(node);
      else tablesWithoutElse(node.otherwise, out);
      for (const b of node.table.values()) tablesWithoutElse(b, out);
      return out;
  }
}

function discreteValueText(program: CompiledProgram, data: MappedData, variableOrder: string[], by: number, code: number): string {
  const v = program.discrete[by]!;
  const labels = data.dictionaries[variableOrder.indexOf(v.key)];
  return labels && Number.isInteger(code) && labels[code] !== undefined ? `"${labels[code]}"` : String(code);
}

function discreteLabel(program: CompiledProgram, by: number): string {
  const v = program.discrete[by]!.variable;
  return (v.label || v.key).replace(/^./, (c) => c.toLowerCase());
}

/** The warning for a gap in a limit table: what has no entry, and how many rows it leaves out. */
export function limitGapWarning(what: string, count: number): Warning {
  return { code: 'limit-table-gap', message: `${what}: ${rowsWord(count)} are left out. Add an entry for it, or an 'any other value' limit.` };
}

const rowsWord = (n: number) => `${countText(n)} row${n === 1 ? '' : 's'}`;

/**
 * Why a criterion cannot be evaluated for the units in `rows`, grouped: each missing table entry
 * by the value that has none (so the analyst can add it), and apart from them the units whose
 * limit exists but whose arithmetic fails (a division by zero, a result too large to hold).
 */
function unevaluableGroups(program: CompiledProgram, margin: IrNode, data: MappedData, cols: DesignColumns, variableOrder: string[],
  criterion: string, rows: number[]): { excluded: ExclusionReason[]; warnings: Warning[] } {
  const tables = tablesWithoutElse(margin);
  const gaps = new Map<string, { by: number; code: number; count: number; rows: number[] }>();
  const arithmetic: number[] = [];
  for (const r of rows) {
    const table = tables.find((t) => !t.table.has(cols.discrete[t.by]![r]!) && !Number.isNaN(cols.discrete[t.by]![r]!));
    if (!table) { arithmetic.push(r); continue; }
    const code = cols.discrete[table.by]![r]!;
    const key = `${table.by}:${code}`;
    const g = gaps.get(key) ?? { by: table.by, code, count: 0, rows: [] };
    g.count++;
    if (g.rows.length < MAX_LISTED) g.rows.push(data.rowNumbers[r]!);
    gaps.set(key, g);
  }
  const excluded: ExclusionReason[] = [];
  const warnings: Warning[] = [];
  for (const g of [...gaps.values()].sort((a, b) => a.by - b.by || a.code - b.code)) {
    const what = `the limit of "${criterion}" has no entry for ${discreteLabel(program, g.by)} ${discreteValueText(program, data, variableOrder, g.by, g.code)}`;
    excluded.push({ reason: what, count: g.count, rows: g.rows });
    warnings.push(limitGapWarning(what, g.count));
  }
  if (arithmetic.length) {
    excluded.push({
      reason: `the rule cannot be evaluated for "${criterion}": its arithmetic has no finite result for the unit (a division by zero, or a number too large)`,
      count: arithmetic.length,
      rows: arithmetic.slice(0, MAX_LISTED).map((r) => data.rowNumbers[r]!),
    });
  }
  return { excluded, warnings };
}

function isDeterministic(program: CompiledProgram): boolean {
  const { ifEligible, ifIneligible } = program.offer;
  return (ifEligible === 0 || ifEligible === 1) && (ifIneligible === 0 || ifIneligible === 1);
}

export function prepareUnits(program: CompiledProgram, mapped: MappedData, variableOrder: string[], describe: (atom: number) => string): PreparedUnits {
  // 1. units where some criterion cannot be evaluated (no limit for their value, a division by zero)
  let cols = designColumns(program, mapped, variableOrder);
  const keep = new Uint8Array(mapped.n).fill(1);
  const excludedByRule: ExclusionReason[] = [];
  const warnings: Warning[] = [];
  for (const atom of program.atoms) {
    if (atom.kind !== 'compare') continue;
    const m = evalColumn(atom.margin, cols);
    const rows: number[] = [];
    for (let r = 0; r < mapped.n; r++) {
      if (Number.isFinite(m[r]!) || !keep[r]) continue;
      keep[r] = 0;
      rows.push(r);
    }
    if (!rows.length) continue;
    const groups = unevaluableGroups(program, atom.margin, mapped, cols, variableOrder, describe(atom.index), rows);
    excludedByRule.push(...groups.excluded);
    warnings.push(...groups.warnings);
  }
  const data = excludedByRule.length ? keepUnits(mapped, keep) : mapped;
  if (data !== mapped) cols = designColumns(program, data, variableOrder);

  // 2. the formula's verdicts, the instrument and fidelity to the recorded decisions
  const v = verdicts(program, cols);
  const deterministic = isDeterministic(program);
  let z: Float64Array;
  let instrument: PreparedUnits['instrument'];
  if (deterministic) {
    z = v.offerProbability.slice();
    instrument = { source: 'formula', note: 'The offer is the formula\'s own verdict, computed by Fenceline from the inputs; recorded decisions that differ are reported as overrides.' };
  } else {
    z = data.decision!.slice();
    instrument = { source: 'recorded-decision', note: 'The offer is random among some units (a lottery), so the recorded decision is the instrument.' };
  }
  let fidelity: Fidelity | null = null;
  if (data.decision) {
    let agree = 0, offeredAgainst = 0, refusedAgainst = 0;
    const ids: string[] = [];
    for (let r = 0; r < data.n; r++) {
      const recorded = data.decision[r]!;
      const p = v.offerProbability[r]!;
      // with a lottery only offers the rule makes impossible (p = 0) or certain (p = 1) can disagree
      const against = recorded === 1 ? p === 0 : p === 1;
      if (!against) { agree++; continue; }
      if (recorded === 1) offeredAgainst++;
      else refusedAgainst++;
      if (ids.length < MAX_LISTED) ids.push(data.ids[r]!);
    }
    fidelity = {
      compared: data.n,
      agree,
      disagree: data.n - agree,
      disagreeIds: ids,
      offeredAgainstRule: offeredAgainst,
      refusedAgainstRule: refusedAgainst,
      basis: deterministic
        ? 'Each recorded decision was compared with the formula\'s verdict for the same unit.'
        : 'With a lottery, a recorded decision disagrees only where the formula makes an offer impossible (probability 0) or certain (probability 1).',
    };
  }
  return { data, cols, z, eligible: v.eligible, offerProbability: v.offerProbability, excludedByRule, warnings, fidelity, instrument };
}
