// Invented demo data for the sample program "Home Repair Grant (invented example)": a weighted
// point score and an "at least 2 of 3" gate. Every household, district and number is made up
// by a seeded simulation with a known true effect. No real program, agency, person or data set
// is represented.
//
// The rule (the study file holds the same rule as data):
//   points = 0.6·condition + 0.002·repair cost + 3·dependents ≥ 45, AND at least 2 of
//   { income ≤ 30,000;  condition ≥ 55;  repair cost ≥ 6,000 }.
//
// Data-generating process (per household):
//   condition deficit C ~ N(50, 15²) in [0, 100], two decimals (a surveyor's index: higher = worse);
//   income I = exp(N(ln 31,000, 0.45²)), whole dollars; repair estimate R = exp(N(ln 6,500, 0.5²)), whole dollars;
//   dependents K ~ min(4, ⌊Exp(1.1)⌋) (a discrete rule input, held fixed in the neighbourhood);
//   owner age (whole years, a covariate only) ~ U{25, …, 89};
//   unobserved frailty u ~ N(0, 1); prior monthly heating bill B0 = 120 + 0.9·C + 8·K − 0.0008·I + 20·u + N(0, 15²);
//   offer Z = the rule's verdict (deterministic); repairs completed D = 1 if offered and
//   0.2 + 0.7·u + N(0, 1) > 0 (about 55%); next winter's monthly heating bill
//   Y = 0.8·B0 + 30 + 0.3·C + 12·u + TRUE_EFFECT·D + N(0, 12²), so the effect is exactly TRUE_EFFECT.
// Defects planted on purpose are listed in HomeRepairSample.planted.

import { createRng } from '../design/random.ts';
import { col, normal, roundTo, sheetRowOf, unitId, type PlantedDefect, type SampleFiles, type SampleSheet } from './sample-sheet.ts';

export const HOME_REPAIR_TRUE_EFFECT = -18;

export interface HomeRepairSample extends SampleFiles {
  planted: PlantedDefect[];
}

/** The sample program's rule, written out. */
export function homeRepairEligible(condition: number, income: number, cost: number, dependents: number): boolean {
  const points = 0.6 * condition + 0.002 * cost + 3 * dependents;
  const gate = (income <= 30000 ? 1 : 0) + (condition >= 55 ? 1 : 0) + (cost >= 6000 ? 1 : 0);
  return points >= 45 && gate >= 2;
}

export function homeRepairSample(n = 14000, seed = 7303): HomeRepairSample {
  const rng = createRng(seed, 1);
  const sheet: SampleSheet = {
    file: 'households.xlsx',
    sheet: 'Households',
    titleRows: [],
    header: ['HOUSEHOLD', 'DISTRICT', 'CONDITION', 'INCOME', 'REPAIR_COST', 'DEPENDENTS', 'OWNER_AGE', 'BILL_BEFORE', 'REPAIRED', 'BILL_AFTER'],
    rows: [],
  };
  for (let i = 0; i < n; i++) {
    const condition = roundTo(Math.min(100, Math.max(0, 50 + 15 * normal(rng))), 2);
    const income = Math.round(Math.exp(Math.log(31000) + 0.45 * normal(rng)));
    const cost = Math.round(Math.exp(Math.log(6500) + 0.5 * normal(rng)));
    const dependents = Math.min(4, Math.floor(-Math.log(1 - rng.next()) * 1.1));
    const ownerAge = 25 + Math.floor(rng.next() * 65);
    const u = normal(rng);
    const before = 120 + 0.9 * condition + 8 * dependents - 0.0008 * income + 20 * u + 15 * normal(rng);
    const offered = homeRepairEligible(condition, income, cost, dependents);
    const repaired = offered && 0.2 + 0.7 * u + normal(rng) > 0 ? 1 : 0;
    const after = 0.8 * before + 30 + 0.3 * condition + 12 * u + HOME_REPAIR_TRUE_EFFECT * repaired + 12 * normal(rng);
    const district = `District ${String.fromCharCode(65 + Math.floor(rng.next() * 12))}`;
    sheet.rows.push([unitId('H-', i + 1, 5), district, condition, income, cost, dependents, ownerAge, roundTo(before, 2), repaired, roundTo(after, 2)]);
  }
  const planted: PlantedDefect[] = [];
  const at = (i: number) => sheetRowOf(sheet, i);
  sheet.rows[77]![col(sheet, 'REPAIR_COST')] = 'quote pending';
  planted.push({ file: sheet.file, sheetRow: at(77), what: 'REPAIR_COST holds "quote pending"', reason: 'REPAIR_COST is not a number' });
  sheet.rows[1500]![col(sheet, 'CONDITION')] = '#N/A';
  planted.push({ file: sheet.file, sheetRow: at(1500), what: 'CONDITION holds the Excel error #N/A', reason: 'CONDITION holds an Excel error value' });
  sheet.rows[2600]![col(sheet, 'INCOME')] = '$27,450'; // a number written with a sign and separator: read, with a note
  sheet.rows[4321]![col(sheet, 'HOUSEHOLD')] = null;
  planted.push({ file: sheet.file, sheetRow: at(4321), what: 'HOUSEHOLD is blank', reason: 'HOUSEHOLD is blank' });
  sheet.rows[6002]![col(sheet, 'HOUSEHOLD')] = sheet.rows[6001]![col(sheet, 'HOUSEHOLD')]!;
  planted.push({ file: sheet.file, sheetRow: at(6001), what: 'two rows share one HOUSEHOLD', reason: 'duplicate HOUSEHOLD' });
  planted.push({ file: sheet.file, sheetRow: at(6002), what: 'two rows share one HOUSEHOLD', reason: 'duplicate HOUSEHOLD' });
  sheet.rows[9999]![col(sheet, 'REPAIRED')] = 'maybe';
  planted.push({ file: sheet.file, sheetRow: at(9999), what: 'REPAIRED is "maybe"', reason: 'REPAIRED is not 0/1' });
  sheet.rows[11000]![col(sheet, 'BILL_BEFORE')] = '';
  planted.push({ file: sheet.file, sheetRow: at(11000), what: 'BILL_BEFORE (a control) is empty', reason: 'BILL_BEFORE is blank' });
  return { folder: 'home-repair', sheets: [sheet], planted };
}
