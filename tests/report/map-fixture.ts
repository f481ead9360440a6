// An invented study with three continuous inputs for the map's tests: offered when
// x + y + w ≤ 15 (each input 0–10, scale 2), so a map over two of them holds the third at a value.
// Made up by a seeded generator (Park & Miller 1988 minimal standard); nothing here is real data.

import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const SUM_LIMIT = 15;

export function threeInputCsv(n: number, seed = 5): string {
  let s = seed;
  const next = () => { s = (s * 16807) % 2147483647; return s / 2147483647; };
  const lines = ['ID,X,Y,W,RECEIVED,OUT'];
  for (let i = 0; i < n; i++) {
    const [x, y, w] = [next(), next(), next()].map((u) => Math.round(u * 1000) / 100) as [number, number, number];
    const offered = x + y + w <= SUM_LIMIT ? 1 : 0;
    const received = offered && next() < 0.8 ? 1 : 0;
    const out = Math.round((50 + 2 * x - y + 5 * received + 3 * (next() - 0.5)) * 100) / 100;
    lines.push([`U${i + 1}`, x, y, w, received, out].join(','));
  }
  return lines.join('\n') + '\n';
}

export function threeInputStudy() {
  return {
    fenceline: 1,
    title: 'Three-input points rule (invented test study)',
    program: {
      name: 'Points rule (invented)',
      unit: 'applicant',
      variables: [
        { key: 'x', label: 'Need score', type: 'continuous', unit: 'points', column: 'X', scale: 2 },
        { key: 'y', label: 'Hardship score', type: 'continuous', unit: 'points', column: 'Y', scale: 2 },
        { key: 'w', label: 'Waiting score', type: 'continuous', unit: 'points', column: 'W', scale: 2 },
      ],
      rule: { value: 'x + y + w', op: '<=', limit: SUM_LIMIT },
      offer: { ifEligible: 1, ifIneligible: 0 },
    },
    data: { path: 'units.csv' },
    columns: { id: 'ID', outcomes: [{ column: 'OUT', label: 'Outcome (invented)' }], treatment: 'RECEIVED' },
    settings: { deltas: [0.1, 0.25, 0.5], draws: 300, seed: 7 },
  };
}

/** Write the study and its data to a fresh temp folder; returns the study file's path. */
export function writeThreeInputFixture(n = 1500): string {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-map3-'));
  writeFileSync(join(dir, 'units.csv'), threeInputCsv(n));
  writeFileSync(join(dir, 'study.json'), JSON.stringify(threeInputStudy(), null, 2));
  return join(dir, 'study.json');
}
