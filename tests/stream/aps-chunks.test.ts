// A unit's APS does not depend on how the rows are cut into chunks: the quasi-random points are
// one set per study (dimension, draws, seed; main/design/ball-points.ts), never drawn per row, so
// the streamed path's chunks and the in-memory path's blocks give every unit the same number.
// Checked with every unit simulated (no closed form), on two continuous inputs.

import { describe, expect, it } from 'vitest';
import { computeApsBlock, sliceColumns, type ApsColumns } from '../../main/design/aps.ts';
import { ballPointSet } from '../../main/design/ball-points.ts';
import { lowerValidatedProgram } from '../../main/rules/compile.ts';
import type { DesignColumns } from '../../main/rules/ir.ts';
import { fixtureStudy } from '../report/memo-fixture.ts';

const study = fixtureStudy();
const program = lowerValidatedProgram(study.program as never);
const n = 5_000;
// Park & Miller (1988) minimal standard generator for the invented inputs.
let state = 97;
const next = () => { state = (state * 16807) % 2147483647; return state / 2147483647; };
const income = Float64Array.from({ length: n }, () => 10000 + 40000 * next());
const size = Float64Array.from({ length: n }, () => 1 + Math.floor(4 * next()));
const age = Float64Array.from({ length: n }, () => 20 + 70 * next());
const cols: DesignColumns = { n, continuous: program.continuous.map((v) => (v.key === 'income' ? income : age)), discrete: [size] };
const settings = { deltas: [0.05, 0.2], draws: 256, seed: 3 };
const points = ballPointSet(program.continuous.length, settings.draws, settings.seed);
const scales = [10000, 10];

function inChunks(chunk: number): ApsColumns[] {
  const out: ApsColumns[] = [];
  for (let from = 0; from < n; from += chunk) out.push(computeApsBlock(program, sliceColumns(cols, from, Math.min(n, from + chunk)), scales, settings, points, { simulateAll: true }));
  return out;
}

describe('APS per unit, whatever the chunking', () => {
  it('is identical (bit for bit) in one block and in chunks of 7,777, 1,000 and 333', () => {
    const whole = inChunks(n)[0]!;
    expect(whole.aps[0]!.some((p) => p > 0 && p < 1)).toBe(true);
    for (const chunk of [7_777, 1_000, 333]) {
      const parts = inChunks(chunk);
      settings.deltas.forEach((_, k) => {
        const joined = new Float64Array(n);
        let at = 0;
        for (const p of parts) { joined.set(p.aps[k]!, at); at += p.n; }
        expect(joined).toEqual(whole.aps[k]);
      });
    }
  });
});
