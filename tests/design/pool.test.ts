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
    expect(base.value.summary[1]!.simulated).toBeGreaterThan(0);
    expect(base.value.summary[1]!.exact).toBeGreaterThan(0);
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
