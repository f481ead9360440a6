// A single-file variant of the winter-credit sample (invented data, main/sample-data/
// winter-credit.ts): one CSV with every column and a study that reads it. Used by the job
// worker tests and the responsiveness benchmark.

import { openSync, closeSync, readFileSync, writeSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { winterCreditRows } from '../../main/sample-data/winter-credit.ts';

/** The sample program's rule, read from its study file rather than restated. */
const SAMPLE_PROGRAM: unknown = JSON.parse(readFileSync(new URL('../../sample-programs/winter-credit/study.json', import.meta.url), 'utf8')).program;

export const singleFileStudy = (deltas: number[] = [0.05, 0.1, 0.2]) => ({
  fenceline: 1,
  title: 'Winter energy credit, one file (invented data)',
  program: SAMPLE_PROGRAM,
  data: { path: 'applicants.csv' },
  columns: {
    id: 'APPLICANT_ID',
    outcomes: [{ column: 'ARREARS_MARCH', label: 'Utility arrears in March (USD)' }],
    treatment: 'RECEIVED',
    decision: 'OFFERED',
    cluster: 'OFFICE',
    covariates: ['ARREARS_PRIOR', 'RENTER'],
  },
  settings: { deltas, draws: 4000, seed: 1 },
});

/** Write applicants.csv (`rows` invented households) and study.json into `dir`; returns the study's path. */
export function writeSingleFileStudy(dir: string, rows: number, seed = 2026, deltas?: number[]): string {
  const CHUNK = 100_000;
  const fd = openSync(join(dir, 'applicants.csv'), 'w');
  try {
    for (let start = 0, chunk = 0; start < rows; start += CHUNK, chunk++) {
      // each chunk its own seed, ids made unique by prefix (the generator numbers from 1 in each call)
      const part = winterCreditRows(Math.min(CHUNK, rows - start), seed + chunk);
      const header = Object.keys(part[0]!) as Array<keyof (typeof part)[number]>;
      const lines = part.map((r) => header.map((h) => (h === 'APPLICANT_ID' ? `${chunk}-${r[h]}` : String(r[h]))).join(','));
      writeSync(fd, (start === 0 ? header.join(',') + '\r\n' : '') + lines.join('\r\n') + '\r\n');
    }
  } finally {
    closeSync(fd);
  }
  const studyPath = join(dir, 'study.json');
  writeFileSync(studyPath, JSON.stringify(singleFileStudy(deltas), null, 2));
  return studyPath;
}
