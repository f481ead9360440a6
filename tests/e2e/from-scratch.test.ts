// A new study from a blank page, through the forms only, as an analyst new to Fenceline does it
// (project issue 11): three variables, an income limit table by household size and an age
// criterion, a 3,000-row workbook written here with exceljs, run, memo. Every action (a click, a
// typed field, a file pick) is counted from the first screen to the exported memo; the count must
// be at most 25 (recorded in docs/benchmarks.md). On the Rule screen, every problem count shown
// must equal the messages shown.
//
// The workbook is invented (a seeded generator, Park and Miller 1988 minimal standard) with a
// known effect: taking up the grant lowers later arrears by 300 (USD).

import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UPLOAD_ENDPOINT } from '../../main/contract/api.ts';
import { openSession, shot, type Session } from './browser.ts';

const EFFECT = -300;
const LIMITS: Record<number, number> = { 1: 20_000, 2: 27_000, 3: 34_000, 4: 41_000 };
const AGE_FROM = 60;
const ROWS = 3000;

async function writeWorkbook(path: string): Promise<void> {
  let s = 20_261;
  const next = () => { s = (s * 16807) % 2147483647; return s / 2147483647; };
  const normal = () => Math.sqrt(-2 * Math.log(next() || 1e-12)) * Math.cos(2 * Math.PI * next());
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Applicants');
  ws.addRow(['APPLICANT_ID', 'ANNUAL_INCOME', 'HOUSEHOLD_SIZE', 'AGE', 'TOOK_UP', 'ARREARS_AFTER']);
  for (let i = 0; i < ROWS; i++) {
    const size = 1 + Math.floor(next() * 4);
    const income = Math.round(5_000 + next() * 55_000);
    const age = 40 + Math.floor(next() * 46);
    const eligible = income <= LIMITS[size]! && age >= AGE_FROM;
    const took = eligible ? (next() < 0.85 ? 1 : 0) : (next() < 0.05 ? 1 : 0);
    const arrears = Math.round(900 - 0.01 * income + 2 * age + EFFECT * took + 100 * normal());
    ws.addRow([`H-${String(i + 1).padStart(5, '0')}`, income, size, age, took, arrears]);
  }
  await wb.xlsx.writeFile(path);
}

let s: Session;
let workbook: string;
beforeAll(async () => {
  s = await openSession();
  workbook = join(s.scratch, 'energy grant applicants.xlsx');
  await writeWorkbook(workbook);
});
afterAll(async () => { await s?.close(); });

/** Browser mode's upload endpoint, or (until the host's side is merged) a stand-in that keeps the bytes in the workspace as the contract says. */
async function ensureUpload(page: Page): Promise<void> {
  const probe = await fetch(`http://127.0.0.1:${s.server.port}${UPLOAD_ENDPOINT}`, { method: 'POST', headers: { 'X-Fenceline-Token': s.server.token, 'X-Fenceline-File-Name': 'probe.csv' }, body: 'A\n1\n' });
  const answer = (await probe.json().catch(() => null)) as { ok?: boolean } | null;
  if (answer?.ok === true) return;
  const dir = join(s.workspace, 'uploads');
  mkdirSync(dir, { recursive: true });
  await page.route(`**${UPLOAD_ENDPOINT}`, async (route) => {
    const name = decodeURIComponent(route.request().headers()['x-fenceline-file-name'] ?? 'file');
    const bytes = route.request().postDataBuffer() ?? Buffer.alloc(0);
    const path = join(dir, name);
    writeFileSync(path, bytes);
    await route.fulfill({ status: 200, contentType: 'application/json', body: JSON.stringify({ ok: true, value: { path, name, bytes: bytes.length, sha256: '' } }) });
  });
}

describe('a new study from scratch, forms only', () => {
  it('reaches the exported memo in at most 25 actions, every problem count equal to the messages shown', { timeout: 600_000 }, async () => {
    const { page } = s;
    const actions: string[] = [];
    const act = async (what: string, f: () => Promise<unknown>) => { actions.push(what); await f(); };
    const idle = () => page.waitForTimeout(400); // the live check runs 250 ms after the last edit

    /** The Rule screen's count (badge and side bar) against the messages on it (Try a unit's own excluded). */
    async function countsAgree(): Promise<number> {
      await idle();
      await expect.poll(async () => (await page.getByText('Checking…').count()), { timeout: 10_000 }).toBe(0);
      const badge = page.getByTestId('rule-to-fix');
      const shown = (await badge.count()) ? Number(/(\d+)/.exec((await badge.textContent()) ?? '')?.[1]) : 0;
      const messages = await page.locator('main .messages li').evaluateAll((els) => els.filter((e) => !e.closest('[aria-labelledby="try-h"]')).length);
      const side = await page.locator('nav.steps li').nth(1).locator('.missing').textContent().catch(() => '');
      const sideCount = Number(/fix (\d+) problem/.exec(side ?? '')?.[1] ?? 0);
      expect(messages, 'messages shown').toBe(shown);
      expect(sideCount, 'side bar count').toBe(shown);
      return shown;
    }

    await page.goto(s.server.url);
    await page.getByRole('heading', { name: 'Start' }).waitFor();
    await ensureUpload(page);

    // Rule: the program, its three variables (declared by label; the data come later).
    await act('click: start a new study', () => page.getByRole('button', { name: 'start a new study from scratch' }).click());
    await page.getByRole('heading', { name: 'Rule', level: 1 }).waitFor();
    expect(await countsAgree()).toBeGreaterThan(0);
    await shot(page, '11-scratch-rule-blank');
    await act('type: program name', () => page.locator('#prog-name').fill('Household energy grant (invented)'));
    await act('type: label 1', () => page.getByLabel('Label of variable 1').fill('Annual income'));
    await act('click: add a variable', () => page.getByRole('button', { name: 'Add a variable' }).click());
    await act('type: label 2', () => page.getByLabel('Label of variable 2').fill('Household size'));
    await act('pick: kind 2', () => page.getByLabel('Kind of variable 2').selectOption('discrete'));
    await act('click: add a variable', () => page.getByRole('button', { name: 'Add a variable' }).click());
    await act('type: label 3', () => page.getByLabel('Label of variable 3').fill('Age'));
    expect(await page.getByLabel('Short name of variable 1').inputValue()).toBe('annual_income');
    await countsAgree();

    // The income limit: a table by household size, filled row by row.
    await act('pick: value compared', () => page.locator('#program-rule-all-0--value').selectOption('annual_income'));
    await act('pick: limit given as a table', () => page.locator('#program-rule-all-0--lkind').selectOption('table'));
    expect(await countsAgree()).toBeGreaterThan(0); // an empty table is incomplete, never a silent 0
    for (const size of [1, 2, 3, 4]) {
      await act(`type: limit for size ${size}`, () => page.getByLabel(`Limit when Household size is ${size}`, { exact: true }).last().fill(String(LIMITS[size])));
    }
    // The age criterion: a new criterion has no limit until one is typed.
    await act('click: add a criterion', () => page.getByRole('button', { name: 'Add a criterion' }).last().click());
    await countsAgree();
    expect(await page.locator('#program-rule-all-1--value').inputValue()).toBe('age');
    expect(await page.locator('#program-rule-all-1--limit').inputValue()).toBe('');
    expect(await page.locator('#program-rule-all-1--lkind').inputValue()).toBe('number');
    expect(await page.getByTestId('reading').textContent()).not.toMatch(/no problems/);
    await shot(page, '12-scratch-rule-incomplete');
    await act('pick: at least', () => page.locator('#program-rule-all-1--op').selectOption('>='));
    await act('type: age limit', () => page.locator('#program-rule-all-1--limit').fill(String(AGE_FROM)));
    expect(await countsAgree()).toBe(0);
    await expect.poll(() => page.getByTestId('reading').textContent(), { timeout: 10_000 }).toMatch(/at least 60/);
    await shot(page, '12-scratch-rule');

    // Data: the workbook as people hand over files; roles from the suggestions; the outcome named.
    await act('click: Data step', () => page.getByRole('button', { name: /^○?✓?\s*Data/ }).click());
    await act('file pick: the workbook', () => page.locator('#data-files').setInputFiles(workbook));
    await page.getByRole('heading', { name: 'First rows' }).waitFor({ timeout: 60_000 });
    expect(await page.getByTestId('data-file').textContent()).toMatch(/energy grant applicants\.xlsx/);
    await act('click: use the suggestions', () => page.getByRole('button', { name: /Use the suggestions/ }).click());
    for (const [column, role] of [['ANNUAL_INCOME', 'variable:annual_income'], ['HOUSEHOLD_SIZE', 'variable:household_size'], ['AGE', 'variable:age'], ['APPLICANT_ID', 'id'], ['TOOK_UP', 'treatment'], ['ARREARS_AFTER', 'outcome']]) {
      expect(await page.getByLabel(`Role of column ${column}`).inputValue(), column).toBe(role);
    }
    expect(await page.locator('#take-up').inputValue()).toBe('column');
    await act('type: outcome name', () => page.locator('#outcome-name-0').fill('Energy arrears a year later (USD)'));
    await expect.poll(() => page.getByTestId('data-report').textContent(), { timeout: 120_000 }).toMatch(/3,000 rows/);
    await shot(page, '13-scratch-data');

    // Run, then the memo.
    await act('click: Run step', () => page.getByRole('button', { name: /^○?✓?\s*Run/ }).click());
    expect(await page.getByTestId('run-blockers').count()).toBe(0);
    await act('click: run the study', () => page.getByRole('button', { name: 'Run the study' }).click());
    await page.getByTestId('run-done').waitFor({ timeout: 240_000 });
    await shot(page, '14-scratch-run-done');
    await act('click: Memo step', () => page.getByRole('button', { name: /^○?✓?\s*Memo/ }).click());
    await page.getByRole('heading', { name: 'Memo', exact: true, level: 1 }).waitFor();
    const exportDir = await page.locator('#memo-dir').inputValue();
    await act('click: write the memo files', () => page.getByRole('button', { name: 'Write the memo files' }).click());
    await expect.poll(() => existsSync(join(exportDir, 'memo.pdf')), { timeout: 180_000 }).toBe(true);
    await page.locator('article.memo h1, article.memo h2').first().waitFor({ timeout: 60_000 });
    await shot(page, '15-scratch-memo');

    console.info(`From a blank study to the exported memo: ${actions.length} actions\n  ${actions.join('\n  ')}`);
    expect(actions.length).toBeLessThanOrEqual(25);

    // The run recovers the invented effect (within four standard errors at the headline delta).
    const runs = join(s.workspace, 'runs');
    const run = readdirSync(runs).map((d) => join(runs, d)).filter((d) => existsSync(join(d, 'results.json'))).sort((a, b) => statSync(b).mtimeMs - statSync(a).mtimeMs)[0]!;
    const results = JSON.parse(readFileSync(join(run, 'results.json'), 'utf8')) as { settings: { deltas: number[] }; outcomes: Array<{ label?: string; byDelta: Array<{ delta: number; estimate: number; se: number }> }> };
    expect(results.outcomes[0]!.label).toBe('Energy arrears a year later (USD)');
    const deltas = results.settings.deltas;
    const headline = results.outcomes[0]!.byDelta.find((b) => b.delta === deltas[Math.floor(deltas.length / 2)])!; // main/estimate/headline.ts
    console.info(`Headline estimate ${headline.estimate} (SE ${headline.se}); the invented effect is ${EFFECT}.`);
    expect(Math.abs(headline.estimate - EFFECT)).toBeLessThan(4 * headline.se);
  });
});
