// The APS at synthetic points (the map's grid), with the same engine, scales and seed as the
// units of a run: where 0 < APS < 1 on the grid is the band the map shades. Kept in the design
// layer so the report layer draws figures without computing propensities itself.

import type { CompiledProgram, DesignColumns } from '../rules/ir.ts';
import { computeApsBlock } from './aps.ts';
import { ballPointSet } from './ball-points.ts';

export function apsOnGrid(program: CompiledProgram, scales: ArrayLike<number>, seed: number): (grid: DesignColumns, delta: number, draws: number) => Float64Array {
  const d = program.continuous.length;
  return (grid, delta, draws) =>
    computeApsBlock(program, grid, scales, { deltas: [delta], draws, seed }, ballPointSet(d, draws, seed)).aps[0]!;
}
