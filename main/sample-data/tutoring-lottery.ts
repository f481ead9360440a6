// Invented demo data for the sample program "Summer Reading Tutoring (invented example)": a
// deterministic cut-off that makes a pupil eligible, then a lottery among the eligible for the
// places. Every pupil, school and number is made up by a seeded simulation with a known true
// effect. No real program, agency, person or data set is represented.
//
// The rule: a pupil is eligible when the autumn reading score is at most the limit for the
// pupil's grade (grade 3: 38, grade 4: 40, grade 5: 42; no other grade takes part); eligible
// pupils enter a lottery that offers a place with probability 1/2; others are never offered.
// With a lottery the recorded decision (OFFERED, the draw) is the instrument.
//
// Data-generating process (per pupil):
//   grade ~ U{3, 4, 5}; autumn score S ~ N(46 + 2·(grade − 4), 11²), two decimals (an average of subtests);
//   school ~ U{1, …, 40} (clustered standard errors); free-meals flag ~ Bernoulli(0.35) (a covariate);
//   unobserved support at home u ~ N(0, 1);
//   offer Z = 1 with probability 1/2 if eligible, else 0; a few ineligible pupils are recorded as
//   offered anyway (overrides the fidelity check reports);
//   attended D = 1 if offered and 0.5 + 0.7·u + N(0, 1) > 0 (about 65%);
//   spring score Y = 8 + 0.85·S + 2·(grade − 4) + 3·u + TRUE_EFFECT·D + N(0, 5²), so the effect is exactly TRUE_EFFECT.
// Defects planted on purpose are listed in TutoringLotterySample.planted.

import { createRng } from '../design/random.ts';
import { col, normal, roundTo, sheetRowOf, unitId, type PlantedDefect, type SampleFiles, type SampleSheet } from './sample-sheet.ts';

export const TUTORING_LOTTERY_TRUE_EFFECT = 4;
export const TUTORING_LOTTERY_WIN_PROBABILITY = 0.5;
export const TUTORING_LIMIT_BY_GRADE: Readonly<Record<number, number>> = { 3: 38, 4: 40, 5: 42 };

export interface TutoringLotterySample extends SampleFiles {
  planted: PlantedDefect[];
  /** IDs of ineligible pupils recorded as offered (overrides). */
  overrides: string[];
}

export function tutoringLotterySample(n = 15000, seed = 1): TutoringLotterySample {
  const rng = createRng(seed, 1);
  const sheet: SampleSheet = {
    file: 'pupils.xlsx',
    sheet: 'Pupils',
    titleRows: ['Summer Reading Tutoring — pupils and lottery results (invented data)', ''],
    header: ['PUPIL_ID', 'SCHOOL', 'GRADE', 'AUTUMN_SCORE', 'FREE_MEALS', 'OFFERED', 'ATTENDED', 'SPRING_SCORE'],
    rows: [],
  };
  const overrides: string[] = [];
  for (let i = 0; i < n; i++) {
    const id = unitId('P', i + 1, 6);
    const grade = 3 + Math.floor(rng.next() * 3);
    const score = roundTo(Math.max(0, 46 + 2 * (grade - 4) + 11 * normal(rng)), 2);
    const school = `School ${String(1 + Math.floor(rng.next() * 40)).padStart(2, '0')}`;
    const meals = rng.next() < 0.35 ? 1 : 0;
    const u = normal(rng);
    const eligible = score <= TUTORING_LIMIT_BY_GRADE[grade]!;
    const draw = rng.next() < TUTORING_LOTTERY_WIN_PROBABILITY ? 1 : 0;
    const override = !eligible && rng.next() < 0.002;
    if (override) overrides.push(id);
    const offered = eligible ? draw : override ? 1 : 0;
    const attended = offered && 0.5 + 0.7 * u + normal(rng) > 0 ? 1 : 0;
    const y = 8 + 0.85 * score + 2 * (grade - 4) + 3 * u + TUTORING_LOTTERY_TRUE_EFFECT * attended + 5 * normal(rng);
    sheet.rows.push([id, school, grade, score, meals, offered, attended, roundTo(y, 1)]);
  }
  const planted: PlantedDefect[] = [];
  const at = (i: number) => sheetRowOf(sheet, i);
  sheet.rows[333]![col(sheet, 'OFFERED')] = 'maybe';
  planted.push({ file: sheet.file, sheetRow: at(333), what: 'OFFERED is "maybe" (the draw was not recorded)', reason: 'OFFERED is not 0/1' });
  sheet.rows[1200]![col(sheet, 'AUTUMN_SCORE')] = 'absent';
  planted.push({ file: sheet.file, sheetRow: at(1200), what: 'AUTUMN_SCORE holds "absent"', reason: 'AUTUMN_SCORE is not a number' });
  sheet.rows[4000]![col(sheet, 'GRADE')] = 6;
  planted.push({
    file: sheet.file, sheetRow: at(4000), what: 'GRADE is 6, a grade the table has no limit for',
    reason: 'the limit of "score ≤ limit by grade" has no entry for grade 6',
  });
  sheet.rows[7000]![col(sheet, 'PUPIL_ID')] = '';
  planted.push({ file: sheet.file, sheetRow: at(7000), what: 'PUPIL_ID is empty', reason: 'PUPIL_ID is blank' });
  sheet.rows[10001]![col(sheet, 'PUPIL_ID')] = sheet.rows[10000]![col(sheet, 'PUPIL_ID')]!;
  planted.push({ file: sheet.file, sheetRow: at(10000), what: 'two rows share one PUPIL_ID', reason: 'duplicate PUPIL_ID' });
  planted.push({ file: sheet.file, sheetRow: at(10001), what: 'two rows share one PUPIL_ID', reason: 'duplicate PUPIL_ID' });
  sheet.rows[12000]![col(sheet, 'SCHOOL')] = null;
  planted.push({ file: sheet.file, sheetRow: at(12000), what: 'SCHOOL (the cluster) is blank', reason: 'SCHOOL is blank' });
  // IDs as generated (before the defects), of the rows the study must exclude.
  const dropped = new Set([333, 1200, 4000, 7000, 10000, 10001, 12000].map((i) => unitId('P', i + 1, 6)));
  return { folder: 'tutoring-lottery', sheets: [sheet], planted, overrides: overrides.filter((id) => !dropped.has(id)) };
}
