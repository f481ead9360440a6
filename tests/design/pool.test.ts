import { describe, expect, it } from 'vitest';
import { computePropensityParallel } from '../../main/design/parallel/pool.ts';
import { computePropensity } from '../../main/design/propensity.ts';
import { createRng } from '../../main/design/random.ts';
import { columns, compile, cont, disc } from './helpers.ts';

describe('propensity on worker threads', () => {
  const p = compile([cont('income', 5000), cont('age', 10), disc('size')], {
    all: [
      { value: 'income', op: '<=', limit: { by: 'size', table: { '1': 21000, '2': 28000 }, else: '35000 + 7000 * (size - 3)' } },
      { any: [{ value: 'age', op: '>=', limit: 65 }, { value: 'income / size', op: '<=', limit: 6000 }] },
    ],
  });
  const rng = createRng(8);
  const rows = Array.from({ length: 3000 }, () => ({ income: 5000 + rng.next() * 40000, age: 40 + rng.next() * 50, size: 1 + Math.floor(rng.next() * 4) }));
  const cols = columns(p, rows);
  const settings = { deltas: [0.05, 0.2], draws: 500, seed: 3 };

  it('gives identical numbers for 0, 1 and 2 workers and any block size', async () => {
    const base = computePropensity(p, cols, settings, { blockSize: 4096 });
    if (!base.ok) throw new Error('setup');
    for (const [workers, blockSize] of [[0, 256], [1, 1000], [2, 333]] as const) {
      const r = await computePropensityParallel(p, cols, settings, { workers, blockSize });
      if (!r.ok) throw new Error('setup');
      for (let k = 0; k < settings.deltas.length; k++) {
        expect(Array.from(r.value.aps[k]!)).toEqual(Array.from(base.value.aps[k]!));
        expect(Array.from(r.value.se[k]!)).toEqual(Array.from(base.value.se[k]!));
        expect(Array.from(r.value.method[k]!)).toEqual(Array.from(base.value.method[k]!));
      }
      expect(r.value.summary).toEqual(base.value.summary);
    }
    // every criterion is linear once the household size is fixed: corners are exact
    expect(base.value.summary[1]!.simulated).toBe(0);
    expect(base.value.summary[1]!.exact).toBeGreaterThan(0);
    expect(base.value.summary[1]!.cornerExact).toBeGreaterThan(0);
    expect(base.value.summary[1]!.cornerExact).toBe(base.value.summary[1]!.corner);
  });

  it('simulated units, with more draws where a first estimate is 0 or 1, give identical numbers for any split', async () => {
    // a non-linear criterion (income × age) keeps part of the work simulated
    const q = compile([cont('income', 5000), cont('age', 10)], {
      all: [{ value: 'income', op: '<=', limit: 30000 }, { value: 'income * age', op: '>=', limit: 1.5e6 }],
    });
    const rng2 = createRng(9);
    const rows2 = Array.from({ length: 1500 }, () => ({ income: 20000 + rng2.next() * 12000, age: 40 + rng2.next() * 40 }));
    const cols2 = columns(q, rows2);
    const s2 = { deltas: [0.05, 0.2], draws: 200, seed: 5 };
    const base = computePropensity(q, cols2, s2, { blockSize: 4096 });
    if (!base.ok) throw new Error('setup');
    expect(base.value.summary[0]!.simulated).toBeGreaterThan(0);
    expect(base.value.summary.reduce((s, x) => s + x.refined, 0)).toBeGreaterThan(0);
    for (const [workers, blockSize] of [[0, 100], [2, 257]] as const) {
      const r = await computePropensityParallel(q, cols2, s2, { workers, blockSize });
      if (!r.ok) throw new Error('setup');
      for (let k = 0; k < s2.deltas.length; k++) {
        expect(Array.from(r.value.aps[k]!)).toEqual(Array.from(base.value.aps[k]!));
        expect(Array.from(r.value.se[k]!)).toEqual(Array.from(base.value.se[k]!));
        expect(Array.from(r.value.refined[k]!)).toEqual(Array.from(base.value.refined[k]!));
      }
      expect(r.value.summary).toEqual(base.value.summary);
    }
  });

  it('reports progress up to the total and can be cancelled', async () => {
    const seen: number[] = [];
    const r = await computePropensityParallel(p, cols, settings, { workers: 2, blockSize: 500, onProgress: (e) => seen.push(e.done) });
    expect(r.ok).toBe(true);
    expect(seen.at(-1)).toBe(3000);
    const controller = new AbortController();
    const pending = computePropensityParallel(p, cols, settings, {
      workers: 2, blockSize: 100, signal: controller.signal, onProgress: (e) => { if (e.done > 0) controller.abort(); },
    });
    await expect(pending).rejects.toThrow(/cancelled/);
  });
});
