// fast-check arbitraries shared by the rules tests: expression trees, structured programs
// (mostly valid), and mutations of valid programs (dropped fields, wrong types, random text).
import fc from 'fast-check';
import { formatExpression } from '../../main/rules/expression.ts';
import type { ExprNode } from '../../main/rules/types.ts';

// ---- Expression trees ----------------------------------------------------------------------

const span = { start: 0, end: 0 };

/** Non-negative literals as the parser produces them (a leading '-' is always a neg node). */
export const literal: fc.Arbitrary<number> = fc.oneof(
  fc.integer({ min: 0, max: 100_000 }),
  fc.double({ min: 0, max: 1e6, noNaN: true, noDefaultInfinity: true }).filter((v) => !Object.is(v, -0)),
  fc.constantFrom(0.1, 0.5, 1e-7, 1e21, 5e-324, 1.7976931348623157e308, 123456.789),
);

export function exprTree(keys: readonly string[], num: fc.Arbitrary<number> = literal, maxDepth = 5): fc.Arbitrary<ExprNode> {
  const { node } = fc.letrec((tie) => ({
    node: fc.oneof(
      { depthSize: 'small', maxDepth, withCrossShrink: true },
      num.map((value): ExprNode => ({ kind: 'num', value, ...span })),
      fc.constantFrom(...keys).map((key): ExprNode => ({ kind: 'var', key, ...span })),
      tie('node').map((arg): ExprNode => ({ kind: 'neg', arg: arg as ExprNode, ...span })),
      fc.tuple(fc.constantFrom('+', '-', '*', '/') , tie('node'), tie('node')).map(
        ([op, left, right]): ExprNode => ({ kind: 'bin', op, left: left as ExprNode, right: right as ExprNode, ...span }),
      ),
      fc.tuple(fc.constantFrom('min', 'max'), fc.array(tie('node'), { minLength: 2, maxLength: 3 })).map(
        ([fn, args]): ExprNode => ({ kind: 'call', fn, args: args as ExprNode[], ...span }),
      ),
    ),
  }));
  return node as fc.Arbitrary<ExprNode>;
}

/** The tree without positions, for structural comparison. */
export function stripSpans(n: ExprNode): unknown {
  switch (n.kind) {
    case 'num': return { kind: 'num', value: n.value };
    case 'var': return { kind: 'var', key: n.key };
    case 'neg': return { kind: 'neg', arg: stripSpans(n.arg) };
    case 'bin': return { kind: 'bin', op: n.op, left: stripSpans(n.left), right: stripSpans(n.right) };
    case 'call': return { kind: 'call', fn: n.fn, args: n.args.map(stripSpans) };
  }
}

// ---- Structured programs ------------------------------------------------------------------

interface VarSpec { key: string; type: 'continuous' | 'discrete'; values?: number[]; labels?: boolean; range?: [number, number] }

const continuousSpec = (i: number): fc.Arbitrary<VarSpec> => fc.record({
  key: fc.constant(`x${i}`),
  type: fc.constant('continuous' as const),
  range: fc.option(fc.tuple(fc.integer({ min: -100, max: 100 }), fc.integer({ min: 1, max: 200 })).map(([lo, w]): [number, number] => [lo, lo + w]), { nil: undefined }),
});

const discreteSpec = (i: number): fc.Arbitrary<VarSpec> => fc.record({
  key: fc.constant(`d${i}`),
  type: fc.constant('discrete' as const),
  values: fc.option(fc.uniqueArray(fc.integer({ min: 0, max: 9 }), { minLength: 1, maxLength: 5 }), { nil: undefined }),
  labels: fc.boolean(),
});

const specs: fc.Arbitrary<VarSpec[]> = fc.tuple(fc.integer({ min: 1, max: 3 }), fc.integer({ min: 0, max: 2 }))
  .chain(([nc, nd]) => fc.tuple(
    fc.tuple(...Array.from({ length: nc }, (_, i) => continuousSpec(i))),
    nd === 0 ? fc.constant([] as VarSpec[]) : fc.tuple(...Array.from({ length: nd }, (_, i) => discreteSpec(i))),
  ))
  .map(([c, d]) => [...c, ...d]);

function variableJson(s: VarSpec, scale: number | undefined): Record<string, unknown> {
  const v: Record<string, unknown> = { key: s.key, label: `Variable ${s.key}`, type: s.type, column: s.key.toUpperCase() };
  if (s.type === 'continuous') {
    if (scale !== undefined) v.scale = scale;
    if (s.range !== undefined) v.range = s.range;
    v.unit = 'USD';
  } else if (s.values !== undefined) {
    v.values = s.labels ? s.values.map((x) => ({ value: x, label: `level ${x}` })) : s.values;
  }
  return v;
}

/** Expressions without division, so most generated programs are valid; a few divide. */
function expressionSource(keys: string[]): fc.Arbitrary<number | string> {
  const small = fc.integer({ min: 0, max: 50_000 });
  const tree = exprTree(keys, small, 3).map(formatExpression);
  return fc.oneof(
    { weight: 2, arbitrary: small },
    { weight: 3, arbitrary: fc.constantFrom(...keys) },
    { weight: 3, arbitrary: tree },
  );
}

function conditionArb(spec: VarSpec[]): fc.Arbitrary<unknown> {
  const keys = spec.map((s) => s.key);
  const continuous = spec.filter((s) => s.type === 'continuous').map((s) => s.key);
  const discrete = spec.filter((s) => s.type === 'discrete');
  const op = fc.constantFrom('<', '<=', '>', '>=', '==', '!=');
  const comparison = fc.record({
    value: fc.oneof(fc.constantFrom(...continuous), expressionSource(keys)),
    op,
    limit: expressionSource(keys),
  }).filter((c) => typeof c.value === 'string' || typeof c.limit === 'string');
  const leaves: Array<fc.Arbitrary<unknown>> = [comparison];
  for (const d of discrete) {
    const pool = d.values ?? [0, 1, 2, 3];
    const written = (x: number): fc.Arbitrary<number | string> =>
      d.labels && d.values !== undefined ? fc.constantFrom<number | string>(x, String(x), `level ${x}`) : fc.constantFrom<number | string>(x, String(x));
    leaves.push(fc.record({
      value: fc.constant(d.key),
      in: fc.uniqueArray(fc.constantFrom(...pool), { minLength: 1, maxLength: pool.length }).chain((xs) => fc.tuple(...xs.map(written))),
    }));
    leaves.push(fc.record({
      value: fc.constantFrom(...continuous),
      op,
      limit: fc.record({
        by: fc.constant(d.key),
        table: fc.uniqueArray(fc.constantFrom(...pool), { minLength: 1, maxLength: pool.length })
          .chain((xs) => fc.tuple(...xs.map((x) => fc.tuple(fc.constant(String(x)), expressionSource(keys)))))
          .map((entries) => Object.fromEntries(entries)),
        else: expressionSource(keys),
      }, { requiredKeys: ['by', 'table'] }),
    }));
  }
  const { cond } = fc.letrec((tie) => ({
    cond: fc.oneof(
      { depthSize: 'small', maxDepth: 3, withCrossShrink: true },
      fc.oneof(...leaves),
      fc.record({ all: fc.array(tie('cond'), { minLength: 1, maxLength: 3 }) }),
      fc.record({ any: fc.array(tie('cond'), { minLength: 1, maxLength: 3 }) }),
      fc.array(tie('cond'), { minLength: 1, maxLength: 3 }).chain((of) =>
        fc.record({ atLeast: fc.integer({ min: 1, max: of.length }), of: fc.constant(of) })),
      fc.record({ not: tie('cond') }),
      fc.record({ value: fc.constantFrom(...continuous), op, limit: fc.integer({ min: 0, max: 100 }), label: fc.constant('named test') }),
    ),
  }));
  return cond;
}

/** Programs built from the format's grammar; most are valid, some are refused for semantic reasons. */
export const structuredProgram: fc.Arbitrary<Record<string, unknown>> = specs.chain((spec) => fc.record({
  name: fc.constantFrom('Test program', 'Bonus scheme'),
  unit: fc.constantFrom('household', 'applicant', 'person'),
  variables: fc.tuple(...spec.map((s) => fc.option(fc.constantFrom(1, 0.5, 10_000), { nil: undefined }).map((scale) => variableJson(s, scale)))),
  rule: conditionArb(spec),
  offer: fc.constantFrom(
    { ifEligible: 1, ifIneligible: 0 }, { ifEligible: 0.6, ifIneligible: 0 },
    { ifEligible: 0.5, ifIneligible: 0.1 }, { ifEligible: 0, ifIneligible: 1 },
  ),
}, { requiredKeys: ['name', 'variables', 'rule', 'offer'] }));

// ---- Mutations ------------------------------------------------------------------------------

type Slot = { parent: Record<string, unknown> | unknown[]; key: string | number };

function slotsOf(root: unknown): Slot[] {
  const out: Slot[] = [];
  const walk = (v: unknown): void => {
    if (Array.isArray(v)) v.forEach((x, i) => { out.push({ parent: v, key: i }); walk(x); });
    else if (v !== null && typeof v === 'object') {
      for (const k of Object.keys(v)) { out.push({ parent: v as Record<string, unknown>, key: k }); walk((v as Record<string, unknown>)[k]); }
    }
  };
  walk(root);
  return out;
}

const junk: fc.Arbitrary<unknown> = fc.oneof(
  fc.string({ maxLength: 12 }),
  fc.constantFrom('', ' ', 'income', 'size', '1', '1.0', '35,000', '(', 'min(', 'x /', '__proto__', 'continous', '=<', '60%'),
  fc.double(),
  fc.integer(),
  fc.boolean(),
  fc.constant(null),
  fc.constantFrom([], {}, [1, 2], { all: [] }, { value: 'x0' }),
  fc.jsonValue({ maxDepth: 2 }),
);

const mutation = fc.record({
  at: fc.nat(),
  how: fc.constantFrom('drop', 'replace', 'rename', 'duplicate'),
  with: junk,
  newKey: fc.oneof(fc.string({ maxLength: 8 }), fc.constantFrom('limt', 'al', 'vaule', '__proto__', 'constructor', 'else', 'in')),
});

function applyMutation(root: unknown, mutation: { at: number; how: string; with: unknown; newKey: string }): void {
  // A fresh copy of the inserted value: fc.constantFrom hands out the same object every time, and
  // inserting one instance twice could put it inside itself (a cycle no JSON program can have).
  const m = { ...mutation, with: structuredClone(mutation.with) };
  const slots = slotsOf(root);
  if (slots.length === 0) return;
  const { parent, key } = slots[m.at % slots.length]!;
  if (Array.isArray(parent)) {
    const i = key as number;
    if (m.how === 'drop') parent.splice(i, 1);
    else if (m.how === 'duplicate') parent.push(parent[i]);
    else parent[i] = m.with;
    return;
  }
  const k = key as string;
  if (m.how === 'drop') delete parent[k];
  else if (m.how === 'rename') {
    const v = parent[k];
    delete parent[k];
    Object.defineProperty(parent, m.newKey, { value: v, enumerable: true, writable: true, configurable: true });
  } else if (m.how === 'duplicate') Object.defineProperty(parent, m.newKey, { value: parent[k], enumerable: true, writable: true, configurable: true });
  else parent[k] = m.with;
}

/** A valid-looking program with 1–3 random mutations. */
export function mutatedProgram(base: fc.Arbitrary<unknown>): fc.Arbitrary<unknown> {
  return fc.tuple(base, fc.array(mutation, { minLength: 1, maxLength: 3 })).map(([p, ms]) => {
    const copy = JSON.parse(JSON.stringify(p)) as unknown;
    for (const m of ms) applyMutation(copy, m);
    return copy;
  });
}
