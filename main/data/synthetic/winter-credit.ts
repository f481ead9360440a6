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

import { createRng, type Rng } from '../../design/random.ts';

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

function normal(rng: Rng): number {
  // Box–Muller (G. E. P. Box and M. E. Muller, Ann. Math. Statist. 29:610–611, 1958)
  return Math.sqrt(-2 * Math.log(1 - rng.next())) * Math.cos(2 * Math.PI * rng.next());
}

/** The sample program's rule, written out (the study file holds the same rule as data). */
export function winterCreditEligible(income: number, size: number, age: number): boolean {
  const limit = size === 1 ? 21000 : size === 2 ? 28000 : size === 3 ? 35000 : 35000 + 7000 * (size - 3);
  return income <= limit && (age >= 65 || income / size <= 6000);
}

export function winterCreditRows(n: number, seed = 2026): WinterCreditRow[] {
  const rng = createRng(seed, 31);
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
