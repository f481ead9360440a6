// An invented study for the memo tests, written to a temp folder and run end to end, so the
// tests stand alone (they do not depend on sample-programs/, which may change). Everything is made
// up by a seeded generator: a fuel-assistance rule with an income limit by household size and an
// age-or-low-income-per-person test, a true effect of −30, a few overrides, and three rows that
// cannot be used (so the memo must hide a small exclusion count).

import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadStudyFile } from '../../main/studyfile/load.ts';
import { runStudy, type StudyRun } from '../../main/pipeline/run-study.ts';

/** Park & Miller (1988) minimal standard generator, then Box–Muller (1958) for normals. */
function rng(seed: number) {
  let s = seed;
  const next = () => { s = (s * 16807) % 2147483647; return s / 2147483647; };
  const normal = () => Math.sqrt(-2 * Math.log(next())) * Math.cos(2 * Math.PI * next());
  return { next, normal };
}

export const FIXTURE_TRUE_EFFECT = -30;

export function fixtureCsv(n: number, seed = 11): string {
  const g = rng(seed);
  const lines = ['CASE_ID,INCOME,SIZE,AGE,PRIOR,RENTER,OFFERED,RECEIVED,HEATING'];
  for (let i = 0; i < n; i++) {
    const size = 1 + Math.min(3, Math.floor(-Math.log(g.next()) * 1.2));
    const income = Math.round(Math.exp(Math.log(15000 + 5000 * size) + 0.45 * g.normal()));
    const age = Math.round((20 + g.next() * 70) * 100) / 100;
    const renter = g.next() < 0.5 ? 1 : 0;
    const prior = Math.round(Math.max(0, 80 + 60 * g.normal() + 30 * renter));
    const limit = [22000, 29000, 36000, 43000][size - 1]!;
    const eligible = income <= limit && (age >= 65 || income / size <= 7000);
    const override = g.next() < 0.005;
    const offered = eligible !== override ? 1 : 0;
    const u = g.normal();
    const received = offered && 0.3 + 0.8 * u + g.normal() > 0 ? 1 : 0;
    const y = 200 + 0.5 * prior + 20 * renter - 0.001 * income + 40 * u + FIXTURE_TRUE_EFFECT * received + 35 * g.normal();
    lines.push([`C-${String(i + 1).padStart(5, '0')}`, income, size, age, prior, renter, offered, received, Math.round(y * 100) / 100].join(','));
  }
  // Three rows the analysis cannot use: incomes that are not numbers.
  lines.push('C-90001,unknown,2,40,50,0,0,0,210', 'C-90002,,1,70,60,1,1,1,150', 'C-90003,n/a,3,55,90,1,0,0,230');
  return lines.join('\n') + '\n';
}

export function fixtureStudy(overrides: { smallCellMax?: number } = {}) {
  return {
    fenceline: 1,
    title: 'Fuel assistance pilot (invented test study)',
    program: {
      name: 'Fuel Assistance (invented)',
      unit: 'household',
      variables: [
        { key: 'income', label: 'Annual household income', type: 'continuous', unit: 'USD', column: 'INCOME', scale: 10000 },
        { key: 'size', label: 'People in household', type: 'discrete', column: 'SIZE' },
        { key: 'age', label: 'Age of oldest member', type: 'continuous', unit: 'years', column: 'AGE', scale: 10 },
      ],
      rule: {
        all: [
          { value: 'income', op: '<=', limit: { by: 'size', table: { '1': 22000, '2': 29000, '3': 36000, '4': 43000 } } },
          { any: [{ value: 'age', op: '>=', limit: 65 }, { value: 'income / size', op: '<=', limit: 7000 }] },
        ],
      },
      offer: { ifEligible: 1, ifIneligible: 0 },
    },
    data: { path: 'cases.csv' },
    columns: {
      id: 'CASE_ID',
      outcomes: [{ column: 'HEATING', label: 'Heating spending in winter (USD)' }],
      treatment: 'RECEIVED',
      decision: 'OFFERED',
      covariates: ['PRIOR', 'RENTER'],
      labels: { PRIOR: 'Heating arrears before the season (USD)' },
    },
    settings: { deltas: [0.05, 0.1, 0.2], draws: 400, seed: 3, ...(overrides.smallCellMax !== undefined ? { smallCellMax: overrides.smallCellMax } : {}) },
  };
}

/** Write the study and its data to a fresh temp folder; returns the study file's path. */
export function writeFixture(n = 4000, overrides: { smallCellMax?: number } = {}): string {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-memo-'));
  writeFileSync(join(dir, 'cases.csv'), fixtureCsv(n));
  writeFileSync(join(dir, 'study.json'), JSON.stringify(fixtureStudy(overrides), null, 2));
  return join(dir, 'study.json');
}

export async function runFixture(n = 4000, overrides: { smallCellMax?: number } = {}): Promise<StudyRun> {
  const path = writeFixture(n, overrides);
  const loaded = loadStudyFile(path);
  if (!loaded.ok) throw new Error(JSON.stringify(loaded.problems));
  const run = await runStudy(loaded.value.study, { baseDir: loaded.value.baseDir, workers: 0 });
  if (!run.ok) throw new Error(JSON.stringify(run.problems));
  return run.value;
}
