// The program methods of the app: check a program as the analyst builds it, and try one unit
// ("try a unit" panel). They adapt main/rules (validation, wording, compilation, point
// evaluation, Kleene's three-valued logic) and hold no rule logic of their own.

import type { ApiResult, CriterionInfo, ProgramCheck, ProgramCheckArgs, TryUnitArgs, TryUnitCriterion, TryUnitReport } from '../contract/api.ts';
import { formattedNumber } from '../data/cell-text.ts';
import { holds } from '../rules/atoms.ts';
import { discreteCode, lowerValidatedProgram } from '../rules/compile.ts';
import { compilePoint } from '../rules/evaluate-scalar.ts';
import type { CompiledProgram } from '../rules/ir.ts';
import { keysIn } from '../rules/keys-read.ts';
import { isPlainObject, getOwn, describeGiven } from '../rules/json-read.ts';
import { evalTree3, FALSE, TRUE, UNKNOWN, type Tri } from '../rules/logic.ts';
import type { Problem, Program } from '../rules/types.ts';
import { validateProgram } from '../rules/validate.ts';
import { describeCondition, describeOffer, describeProgram, formatPercent } from '../rules/wording.ts';
import { refuse } from './context.ts';

function criteriaOf(compiled: CompiledProgram, program: Program): CriterionInfo[] {
  return compiled.atoms.map((a) => ({
    path: a.path,
    description: describeCondition(a.condition, program),
    variables: a.kind === 'member' ? [compiled.discrete[a.disc]!.key] : [...keysIn(a.margin, compiled, new Set())],
  }));
}

export async function checkProgram(args: ProgramCheckArgs): Promise<ApiResult<ProgramCheck>> {
  const checked = validateProgram(args.program, 'program', { forms: true });
  if (!checked.ok) return { ok: true, value: { valid: false, problems: checked.problems, reading: null, offerReading: null, criteria: [] } };
  const program = checked.value;
  const compiled = lowerValidatedProgram(program);
  return {
    ok: true,
    value: {
      valid: true,
      problems: [],
      reading: describeProgram(program),
      offerReading: describeOffer(program.offer, program.unit ?? 'unit'),
      criteria: criteriaOf(compiled, program),
    },
  };
}

/** A typed value as a number: plain, or written for people ("21,000", "$1,234"); NaN when blank. */
function typedNumber(raw: unknown): number | 'not a number' {
  if (raw === undefined || raw === null) return Number.NaN;
  if (typeof raw === 'number') return Number.isFinite(raw) ? raw : 'not a number';
  if (typeof raw !== 'string') return 'not a number';
  const text = raw.trim();
  if (text === '') return Number.NaN;
  const plain = Number(text);
  if (Number.isFinite(plain)) return plain;
  const formatted = formattedNumber(text);
  return Number.isFinite(formatted) ? formatted : 'not a number';
}

export async function tryUnit(args: TryUnitArgs): Promise<ApiResult<TryUnitReport>> {
  const checked = validateProgram(args.program, 'program', { forms: true });
  if (!checked.ok) return refuse(checked.problems);
  if (!isPlainObject(args.values)) return refuse([{ path: 'values', message: `The values must be given by variable; found ${describeGiven(args.values)}.` }]);
  const program = checked.value;
  const compiled = lowerValidatedProgram(program);
  const problems: Problem[] = [];
  const missing: string[] = [];
  const cont = new Float64Array(compiled.continuous.length);
  const disc = new Float64Array(compiled.discrete.length);
  for (const list of [compiled.continuous, compiled.discrete]) {
    for (const cv of list) {
      const raw = getOwn(args.values, cv.key);
      const v = cv.variable;
      let value = typedNumber(raw);
      if (value === 'not a number' && v.type === 'discrete' && typeof raw === 'string') value = discreteCode(v, raw) ?? 'not a number';
      if (value === 'not a number') {
        const labels = (v.values ?? []).flatMap((x) => (typeof x === 'object' ? [x.label] : []));
        problems.push({ path: `values.${cv.key}`, message: `${v.label}: ${describeGiven(raw)} is not a number${labels.length ? ` or one of ${labels.join(', ')}` : ''}. Type a number such as 21000.` });
        value = Number.NaN;
      }
      if (Number.isNaN(value)) missing.push(v.label);
      (v.type === 'continuous' ? cont : disc)[cv.index] = value;
    }
  }
  for (const k of Object.keys(args.values)) {
    if (!program.variables.some((v) => v.key === k)) problems.push({ path: `values.${k}`, message: `The program has no variable "${k}".` });
  }

  const info = criteriaOf(compiled, program);
  const truth = new Uint8Array(compiled.atoms.length);
  const criteria: TryUnitCriterion[] = compiled.atoms.map((atom, i) => {
    let state: Tri = UNKNOWN;
    let value: number | null = null;
    let limit: number | null = null;
    if (atom.kind === 'member') {
      const d = disc[atom.disc]!;
      if (!Number.isNaN(d)) { state = atom.members.has(d) ? TRUE : FALSE; value = d; }
    } else if (atom.margin.k === 'sub') {
      const v = compilePoint(atom.margin.a)(cont, disc);
      const l = compilePoint(atom.margin.b)(cont, disc);
      value = Number.isFinite(v) ? v : null;
      limit = Number.isFinite(l) ? l : null;
      const m = v - l;
      if (!Number.isNaN(m)) state = holds(m, atom.op) ? TRUE : FALSE;
    }
    truth[i] = state;
    return { ...info[i]!, holds: state === UNKNOWN ? null : state === TRUE, value, limit };
  });
  const verdict = evalTree3(compiled.tree, truth);
  const unit = program.unit ?? 'unit';
  const offerProbability = verdict === UNKNOWN ? null : verdict === TRUE ? program.offer.ifEligible : program.offer.ifIneligible;
  let sentence: string;
  if (verdict === UNKNOWN) {
    const blocking = criteria.filter((c) => c.holds === null).flatMap((c) => c.variables);
    const need = [...new Set(blocking)].map((k) => program.variables.find((v) => v.key === k)?.label ?? k);
    sentence = `The verdict depends on values not given yet: fill in ${need.join(', ') || missing.join(', ')}.`;
  } else {
    sentence = `This ${unit} is ${verdict === TRUE ? 'eligible' : 'not eligible'} and is offered the benefit with probability ${formatPercent(offerProbability!)}.`;
  }
  return {
    ok: true,
    value: {
      verdict: verdict === UNKNOWN ? 'unknown' : verdict === TRUE ? 'eligible' : 'not eligible',
      offerProbability,
      sentence,
      criteria,
      problems,
    },
  };
}
