// Invented demo data for the sample program "Winter Energy Credit (invented example)".
// Every household, office and number here is made up by a seeded simulation with a known
// true effect, so the sample study can show whether Fenceline recovers it. No real program,
// agency, person or data set is represented.
//
// Data-generating process (per household):
//   size ~ 1 + min(5, ⌊Exp(1.6)⌋); income = exp(N(ln(14,000 + 5,500·size), 0.5²)), rounded;
//   age of oldest member ~ U(18, 90), to the hundredth of a year (exact age at application); renter ~ Bernoulli(0.55); prior arrears ~ Gamma-ish, ≥ 0;
//   an unobserved need u ~ N(0, 1) moves both take-up and the outcome (selection on unobservables);
//   offer Z = the rule's verdict; the recorded decision disagrees in a few cases (overrides);
//   take-up D = 1 if offered and 0.4 + 0.8·u + N(0,1) > 0 (about 60–70% take up);
//   March arrears Y = 150 + 0.6·prior + 25·renter − 0.0012·income + 45·u + TRUE_EFFECT·D + N(0, 40²)
//   (not truncated at zero, so the effect is exactly TRUE_EFFECT for everyone; a negative value is a credit balance).
//
// The agency hands the data over in three pieces (winterCreditSample): the applicant roster
// (a workbook), the payment list (a workbook: who was paid, so D = "listed in payments.xlsx")
// and the March outcomes (a CSV keyed by CASE_NO, the same number as APPLICANT_ID). About 1% of
// households have no outcome row (moved away; missing at random), and each file carries a few
// defects planted on purpose (see WinterCreditSample.planted).

import { createRng, type Rng } from '../design/random.ts';
import { col, normal, sheetRowOf, type PlantedDefect, type SampleCell, type SampleFiles, type SampleSheet } from './sample-sheet.ts';

export const WINTER_CREDIT_TRUE_EFFECT = -40;

export interface WinterCreditRow {
  APPLICANT_ID: string;
  HH_INCOME: number;
  HH_SIZE: number;
  AGE_MAX: number;
  OFFICE: string;
  RENTER: number;
  ARREARS_PRIOR: number;
  OFFERED: number;
  RECEIVED: number;
  ARREARS_MARCH: number;
}

/** The sample program's rule, written out (the study file holds the same rule as data). */
export function winterCreditEligible(income: number, size: number, age: number): boolean {
  const limit = size === 1 ? 21000 : size === 2 ? 28000 : size === 3 ? 35000 : 35000 + 7000 * (size - 3);
  return income <= limit && (age >= 65 || income / size <= 6000);
}

/** Every household with all its values (receipt and outcome included), as one table. */
export function winterCreditRows(n: number, seed = 2026): WinterCreditRow[] {
  const rng: Rng = createRng(seed, 31);
  const rows: WinterCreditRow[] = [];
  for (let i = 0; i < n; i++) {
    const size = 1 + Math.min(5, Math.floor(-Math.log(1 - rng.next()) * 1.6));
    const income = Math.round(Math.exp(Math.log(14000 + 5500 * size) + 0.5 * normal(rng)));
    const age = Math.round((18 + rng.next() * 72) * 100) / 100; // exact age at application, in years
    const renter = rng.next() < 0.55 ? 1 : 0;
    const prior = Math.round(Math.max(0, 60 + 80 * normal(rng) + 40 * renter));
    const u = normal(rng);
    const eligible = winterCreditEligible(income, size, age);
    const override = rng.next() < 0.004;
    const offered = eligible !== override ? 1 : 0;
    const received = offered && 0.4 + 0.8 * u + normal(rng) > 0 ? 1 : 0;
    const y = 150 + 0.6 * prior + 25 * renter - 0.0012 * income + 45 * u + WINTER_CREDIT_TRUE_EFFECT * received + 40 * normal(rng);
    rows.push({
      APPLICANT_ID: `A-${String(i + 1).padStart(5, '0')}`,
      HH_INCOME: income,
      HH_SIZE: size,
      AGE_MAX: age,
      OFFICE: `Office ${1 + Math.floor(rng.next() * 24)}`,
      RENTER: renter,
      ARREARS_PRIOR: prior,
      OFFERED: offered,
      RECEIVED: received,
      ARREARS_MARCH: Math.round(y * 100) / 100,
    });
  }
  return rows;
}

export interface WinterCreditSample extends SampleFiles {
  roster: SampleSheet;
  payments: SampleSheet;
  outcomes: SampleSheet;
  /** Roster rows that must be excluded, with their reasons. */
  planted: PlantedDefect[];
  /** IDs in the payment list / outcome file that match no household, and IDs listed twice there. */
  joinDefects: {
    payments: { unmatched: string[]; duplicated: string[]; blankKeyRows: number[] };
    outcomes: { unmatched: string[]; duplicated: string[] };
  };
  /** Households (usable roster rows) without an outcome row: moved away before March. */
  outcomeMissing: string[];
}

const ROSTER_HEADER = ['APPLICANT_ID', 'HH_INCOME', 'HH_SIZE', 'AGE_MAX', 'OFFICE', 'RENTER', 'ARREARS_PRIOR', 'OFFERED'] as const;

/** The three files the agency hands over, with the defects planted in them. */
export function winterCreditSample(n = 20000, seed = 2026): WinterCreditSample {
  const all = winterCreditRows(n, seed);
  const rng = createRng(seed, 32);
  const roster: SampleSheet = {
    file: 'applicants.xlsx',
    sheet: 'Applicants',
    titleRows: ['Winter Energy Credit — applicant roster, first season (invented data)', ''],
    header: [...ROSTER_HEADER],
    rows: all.map((r) => ROSTER_HEADER.map((h) => r[h] as SampleCell)),
  };
  const planted: PlantedDefect[] = [];
  const at = (row: number) => sheetRowOf(roster, row);
  const income = col(roster, 'HH_INCOME');
  const offered = col(roster, 'OFFERED');
  // An income typed as a note, a decision nobody settled, a number written with a currency sign
  // (read, with a note; not a defect), a row typed in without its ID, an application entered twice.
  roster.rows[36]![income] = 'see file';
  planted.push({ file: roster.file, sheetRow: at(36), what: 'HH_INCOME holds the text "see file"', reason: 'HH_INCOME is not a number' });
  roster.rows[4100]![offered] = 'maybe';
  planted.push({ file: roster.file, sheetRow: at(4100), what: 'OFFERED is "maybe"', reason: 'OFFERED is not 0/1' });
  roster.rows[512]![income] = `$${Number(roster.rows[512]![income]).toLocaleString('en-US')}`;
  const blank = [...roster.rows[9000]!];
  blank[0] = null;
  roster.rows.splice(9001, 0, blank);
  planted.push({ file: roster.file, sheetRow: at(9001), what: 'a row without APPLICANT_ID', reason: 'APPLICANT_ID is blank' });
  const twice = [...roster.rows[15000]!];
  roster.rows.splice(15002, 0, twice);
  planted.push({ file: roster.file, sheetRow: at(15000), what: `${String(twice[0])} entered twice`, reason: 'duplicate APPLICANT_ID' });
  planted.push({ file: roster.file, sheetRow: at(15002), what: `${String(twice[0])} entered twice`, reason: 'duplicate APPLICANT_ID' });

  // Payment list: one row per household paid, in payment order by office; plus a payment to an
  // ID that is not on the roster, a household paid twice (a correction) and a row without an ID.
  const paid = all.filter((r) => r.RECEIVED === 1);
  const payRows: SampleCell[][] = paid.map((r) => [r.APPLICANT_ID, 46000 + Math.floor(rng.next() * 60), 150 + 50 * r.HH_SIZE]);
  const duplicatedPayment = paid[200]!.APPLICANT_ID;
  payRows.splice(1500, 0, [duplicatedPayment, 46070, 25]);
  payRows.splice(2500, 0, ['A-99907', 46031, 250]);
  payRows.splice(3100, 0, [null, 46033, 200]);
  const payments: SampleSheet = {
    file: 'payments.xlsx',
    sheet: 'Paid',
    titleRows: [],
    header: ['APPLICANT_ID', 'PAID_ON', 'AMOUNT'],
    rows: payRows,
    formats: { PAID_ON: 'yyyy-mm-dd' },
  };

  // Outcomes: March arrears keyed by CASE_NO; ~1% of households have moved away and have no row.
  const outcomeMissing: string[] = [];
  const outRows: SampleCell[][] = [];
  for (const r of all) {
    if (rng.next() < 0.01) {
      outcomeMissing.push(r.APPLICANT_ID);
      continue;
    }
    outRows.push([r.APPLICANT_ID, r.ARREARS_MARCH]);
  }
  const duplicatedOutcome = all[7000]!.APPLICANT_ID;
  if (!outcomeMissing.includes(duplicatedOutcome)) outRows.splice(7100, 0, [duplicatedOutcome, 0]);
  outRows.splice(12000, 0, ['A-99951', 120.5]);
  const outcomes: SampleSheet = { file: 'outcomes.csv', sheet: null, titleRows: [], header: ['CASE_NO', 'ARREARS_MARCH'], rows: outRows };

  const excludedIds = new Set([String(roster.rows[36]![0]), String(roster.rows[4100]![0]), String(twice[0])]);
  return {
    folder: 'winter-credit',
    sheets: [roster, payments, outcomes],
    roster,
    payments,
    outcomes,
    planted,
    joinDefects: {
      payments: { unmatched: ['A-99907'], duplicated: [duplicatedPayment], blankKeyRows: [sheetRowOf(payments, 3100)] },
      outcomes: { unmatched: ['A-99951'], duplicated: outcomeMissing.includes(duplicatedOutcome) ? [] : [duplicatedOutcome] },
    },
    outcomeMissing: outcomeMissing.filter((id) => !excludedIds.has(id)),
  };
}
