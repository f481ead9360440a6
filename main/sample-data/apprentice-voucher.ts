// Invented demo data for the sample program "Apprenticeship Voucher (invented example)":
// one cut-off on an assessment score, partial take-up. Every applicant, region and number is
// made up by a seeded simulation with a known true effect. No real program, agency, person or
// data set is represented.
//
// Data-generating process (per applicant):
//   assessment score S ~ N(58, 14²), kept in [0, 100], recorded to two decimals;
//   age ~ 18 + ⌊Exp(9)⌋ whole years (a covariate, not a rule input), capped at 64;
//   prior earnings P = max(0, 9,000 + 120·(S − 58) + 6,000·N(0, 1)), whole dollars;
//   unobserved motivation u ~ N(0, 1) moves both take-up and earnings (selection on unobservables);
//   offer Z = [S ≥ 60]; the recorded decision disagrees in 0.3% of cases (overrides);
//   enrolment D = 1 if offered and 0.3 + 0.8·u + N(0, 1) > 0 (about 60%), or, if not offered,
//   with probability 0.04 (a place paid from another fund: take-up is partial on both sides);
//   earnings 12 months later Y = 15,000 + 0.45·P + 70·(S − 58) + 3,000·u + TRUE_EFFECT·D + N(0, 3,500²),
//   so the effect of enrolling is exactly TRUE_EFFECT for everyone.
// Defects planted on purpose are listed in ApprenticeVoucherSample.planted.

import { createRng } from '../design/random.ts';
import { col, normal, roundTo, sheetRowOf, unitId, type PlantedDefect, type SampleFiles, type SampleSheet } from './sample-sheet.ts';

export const APPRENTICE_VOUCHER_TRUE_EFFECT = 2400;
export const APPRENTICE_VOUCHER_CUTOFF = 60;

export interface ApprenticeVoucherSample extends SampleFiles {
  planted: PlantedDefect[];
}

const REGIONS = ['North', 'South', 'East', 'West', 'Coast', 'Hills'];

export function apprenticeVoucherSample(n = 16000, seed = 7101): ApprenticeVoucherSample {
  const rng = createRng(seed, 1);
  const sheet: SampleSheet = {
    file: 'applicants.xlsx',
    sheet: 'Intake 2025',
    titleRows: ['Apprenticeship Voucher — applicants, intake 2025 (invented data)', 'Prepared for the evaluation; one row per applicant', ''],
    header: ['APPLICANT', 'SCORE', 'REGION', 'AGE', 'PRIOR_EARNINGS', 'OFFERED', 'ENROLLED', 'EARNINGS_12M'],
    rows: [],
  };
  for (let i = 0; i < n; i++) {
    const score = roundTo(Math.min(100, Math.max(0, 58 + 14 * normal(rng))), 2);
    const age = Math.min(64, 18 + Math.floor(-Math.log(1 - rng.next()) * 9));
    const prior = Math.round(Math.max(0, 9000 + 120 * (score - 58) + 6000 * normal(rng)));
    const u = normal(rng);
    const eligible = score >= APPRENTICE_VOUCHER_CUTOFF;
    const offered = eligible !== rng.next() < 0.003 ? 1 : 0;
    const enrolled = offered ? (0.3 + 0.8 * u + normal(rng) > 0 ? 1 : 0) : rng.next() < 0.04 ? 1 : 0;
    const y = 15000 + 0.45 * prior + 70 * (score - 58) + 3000 * u + APPRENTICE_VOUCHER_TRUE_EFFECT * enrolled + 3500 * normal(rng);
    const region = REGIONS[Math.floor(rng.next() * REGIONS.length)]!;
    sheet.rows.push([unitId('V', i + 1), score, region, age, prior, offered, enrolled, Math.round(y)]);
  }
  const planted: PlantedDefect[] = [];
  const at = (i: number) => sheetRowOf(sheet, i);
  sheet.rows[120]![col(sheet, 'SCORE')] = 'absent';
  planted.push({ file: sheet.file, sheetRow: at(120), what: 'SCORE holds "absent" (missed the assessment)', reason: 'SCORE is not a number' });
  sheet.rows[2222]![col(sheet, 'OFFERED')] = 'maybe';
  planted.push({ file: sheet.file, sheetRow: at(2222), what: 'OFFERED is "maybe"', reason: 'OFFERED is not 0/1' });
  sheet.rows[3333]![col(sheet, 'ENROLLED')] = 'unknown';
  planted.push({ file: sheet.file, sheetRow: at(3333), what: 'ENROLLED is "unknown"', reason: 'ENROLLED is not 0/1' });
  sheet.rows[5000]![col(sheet, 'APPLICANT')] = null;
  planted.push({ file: sheet.file, sheetRow: at(5000), what: 'APPLICANT is blank', reason: 'APPLICANT is blank' });
  sheet.rows[8001]![col(sheet, 'APPLICANT')] = sheet.rows[8000]![col(sheet, 'APPLICANT')]!;
  planted.push({ file: sheet.file, sheetRow: at(8000), what: 'two rows share one APPLICANT', reason: 'duplicate APPLICANT' });
  planted.push({ file: sheet.file, sheetRow: at(8001), what: 'two rows share one APPLICANT', reason: 'duplicate APPLICANT' });
  sheet.rows[9100]![col(sheet, 'EARNINGS_12M')] = null; // no follow-up: missing for the outcome only
  return { folder: 'apprentice-voucher', sheets: [sheet], planted };
}
