// The whole job in browser mode, as a first-time analyst does it: open a sample program, change
// a threshold and see the reading change, bring in its workbook, map columns, run, read an
// estimate, export the memo and find its files on disk; a damaged workbook shows its message;
// the api refuses calls without the launch token. Screenshots of every screen go to
// tests/artifacts/ (looked at by hand; they assert nothing).

import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSession, shot, type Session } from './browser.ts';

let s: Session;
beforeAll(async () => { s = await openSession(); });
afterAll(async () => { await s?.close(); });

describe('browser mode guards its api with the launch token', () => {
  it('answers 401 without the token, 403 with a wrong one, and 200 with the right one', async () => {
    const base = `http://127.0.0.1:${s.server.port}`;
    const body = JSON.stringify({ method: 'samples.list', args: {} });
    const none = await fetch(`${base}/api/call`, { method: 'POST', body });
    expect(none.status).toBe(401);
    const wrong = await fetch(`${base}/api/call`, { method: 'POST', body, headers: { 'X-Fenceline-Token': 'not-the-token' } });
    expect(wrong.status).toBe(403);
    const inQuery = await fetch(`${base}/api/call?token=${s.server.token}`, { method: 'POST', body });
    expect(inQuery.status).toBe(401);
    const right = await fetch(`${base}/api/call`, { method: 'POST', body, headers: { 'X-Fenceline-Token': s.server.token } });
    expect(right.status).toBe(200);
    expect(((await right.json()) as { ok: boolean }).ok).toBe(true);
  });
  it('serves the page with a Content-Security-Policy that forbids inline scripts and remote content', async () => {
    const r = await fetch(`http://127.0.0.1:${s.server.port}/`);
    const csp = r.headers.get('content-security-policy') ?? '';
    expect(csp).toMatch(/default-src 'none'/);
    expect(csp).toMatch(/script-src 'self'(;|$)/);
    expect(csp).not.toMatch(/unsafe-inline|unsafe-eval|https?:/);
  });
});

describe('the guided path, start to memo', () => {
  it('opens a sample, edits the rule, maps the data, runs, reads the evidence and exports the memo', { timeout: 600_000 }, async () => {
    const { page } = s;
    await page.goto(s.server.url);
    await page.getByRole('heading', { name: 'Start' }).waitFor();
    await page.getByRole('button', { name: /Winter energy credit/ }).waitFor();
    await shot(page, '01-start');

    // Rule: the age threshold 65 → 67 changes the plain-language reading.
    await page.getByRole('button', { name: /Winter energy credit/ }).click();
    const reading = page.getByTestId('reading');
    await expect.poll(() => reading.textContent(), { timeout: 10_000 }).toMatch(/at least 65/);
    const ageLimit = page.locator('input[id="program-rule-all-1-any-0--limit"]');
    await ageLimit.fill('67');
    await expect.poll(() => reading.textContent(), { timeout: 10_000 }).toMatch(/at least 67/);
    expect(await reading.textContent()).not.toMatch(/at least 65/);
    // Try a unit: 20,000 USD, 2 people, oldest 70 → eligible.
    await page.getByLabel('Annual household income (USD)', { exact: true }).fill('20,000');
    await page.getByLabel('People in household', { exact: true }).fill('2');
    await page.getByLabel('Age of oldest member (years)', { exact: true }).fill('70');
    await expect.poll(() => page.getByTestId('try-verdict').textContent(), { timeout: 10_000 }).toMatch(/Eligible/);
    // A broken limit shows its message next to the field, and the reading waits.
    await ageLimit.fill('sixty');
    await expect.poll(() => reading.textContent(), { timeout: 10_000 }).toMatch(/to fix/);
    await expect.poll(async () => (await ageLimit.getAttribute('aria-invalid')) ?? '', { timeout: 10_000 }).toBe('true');
    await shot(page, '02-rule-with-problem');
    await ageLimit.fill('67');
    await expect.poll(() => reading.textContent(), { timeout: 10_000 }).toMatch(/at least 67/);
    await shot(page, '02-rule');

    // Data: bring in the workbook by its path, see the preview, map columns, check.
    await page.getByRole('button', { name: /^○?\s*Data/ }).click();
    await page.getByText("Type the file's location instead").click();
    const pathBox = page.getByLabel(/Workbook \(\.xlsx\) or CSV file/);
    const workbook = join(import.meta.dirname, '..', '..', 'sample-programs', 'winter-credit', 'applicants.xlsx');
    await pathBox.fill(workbook);
    await page.getByRole('button', { name: 'Open', exact: true }).first().click();
    await page.getByRole('heading', { name: 'First rows' }).waitFor({ timeout: 60_000 });
    const renter = page.getByLabel('Role of column RENTER');
    await renter.selectOption({ label: 'Not used' });
    await renter.selectOption({ label: 'Covariate (for balance checks)' });
    expect(await renter.inputValue()).toBe('covariate');
    // The data are checked by themselves once every role is given.
    await expect.poll(() => page.getByTestId('data-report').textContent(), { timeout: 60_000 }).toMatch(/will be used/);
    await shot(page, '03-data');

    // Run: progress, then done.
    await page.getByRole('button', { name: /^○?\s*Run/ }).click();
    await shot(page, '04-run-settings');
    await page.getByRole('button', { name: 'Run the study' }).click();
    await page.locator('progress').waitFor({ timeout: 10_000 }).catch(() => {});
    await shot(page, '04-run-progress');
    await page.getByTestId('run-done').waitFor({ timeout: 180_000 });
    await shot(page, '04-run-done');

    // Evidence: an estimate with its interval.
    await page.getByRole('button', { name: 'Read the evidence' }).click();
    const verdict = page.getByTestId('effect-verdict').first();
    await verdict.waitFor();
    expect(await verdict.textContent()).toMatch(/changed .* by −?\d/);
    const estimates = await page.getByTestId('estimate').allTextContents();
    expect(estimates.some((e) => /^−?\d/.test(e))).toBe(true);
    await page.waitForTimeout(300);
    await shot(page, '05-evidence');

    // Map: the memo's choices first; then the delta slider (by keyboard) and an axis picker redraw it.
    await page.getByRole('button', { name: /^○?✓?\s*Map/ }).click();
    const chart = page.getByTestId('map-chart');
    await chart.locator('canvas').waitFor({ timeout: 60_000 });
    expect(await chart.getAttribute('data-axes')).toBe('income,age');
    expect(await chart.getAttribute('data-delta')).toBe('0.1');
    await page.waitForTimeout(300);
    await shot(page, '06-map');
    const before = await chart.locator('canvas').screenshot();
    const slider = page.getByLabel(/Ball radius δ/);
    await slider.focus();
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => chart.getAttribute('data-delta'), { timeout: 30_000 }).toBe('0.2');
    expect(await page.getByTestId('map-delta-value').textContent()).toBe('0.2');
    await page.waitForTimeout(300);
    expect((await chart.locator('canvas').screenshot()).equals(before)).toBe(false);
    await page.getByLabel('Across (x axis)').selectOption({ label: 'Age of oldest member' });
    await expect.poll(() => chart.getAttribute('data-axes'), { timeout: 30_000 }).toBe('age,income');
    expect(await page.getByLabel('Up (y axis)').inputValue()).toBe('income');
    expect(await chart.locator('canvas').getAttribute('aria-label')).toMatch(/Age of oldest member across, Annual household income up, band at delta 0\.2/);
    await page.getByLabel('People in household').selectOption('2');
    await page.getByLabel('Show individual units (private view)').check();
    await expect.poll(() => chart.getAttribute('data-view'), { timeout: 30_000 }).toBe('units');
    await page.waitForTimeout(300);
    await shot(page, '06-map-private-view');

    // Memo: the files the run wrote, on disk.
    await page.getByRole('button', { name: /^○?✓?\s*Memo/ }).click();
    await page.getByRole('heading', { name: 'Memo', exact: true, level: 1 }).waitFor();
    const info = (await (await fetch(`http://127.0.0.1:${s.server.port}/api/call`, {
      method: 'POST', headers: { 'X-Fenceline-Token': s.server.token }, body: JSON.stringify({ method: 'workspace.info', args: {} }),
    })).json()) as { value: { memoFormats: string[] } };
    if (info.value.memoFormats.length === 0) {
      console.warn('Memo files not checked: study.evaluate reports that this version writes no memo formats.');
      await shot(page, '07-memo');
      return;
    }
    const listed = await page.getByTestId('memo-files').locator('li .hint').allTextContents();
    expect(listed.length).toBe(info.value.memoFormats.length);
    for (const f of listed) expect(existsSync(f) && statSync(f).size > 0, f).toBe(true);
    // Written again from the stored run into a folder of the workspace (the app may write only
    // there and where the analyst chose in a dialog): the run's folder with "-memo".
    const exportDir = await page.locator('#memo-dir').inputValue();
    expect(exportDir.startsWith(join(s.workspace, 'runs'))).toBe(true);
    await page.getByRole('button', { name: 'Write the memo files' }).click();
    await expect.poll(() => existsSync(join(exportDir, 'memo.pdf')), { timeout: 120_000 }).toBe(true);
    for (const name of ['memo.html', 'memo.docx', 'tables.xlsx']) expect(existsSync(join(exportDir, name)), name).toBe(true);
    await page.locator('article.memo h1, article.memo h2').first().waitFor({ timeout: 30_000 });
    await shot(page, '07-memo');
    expect(s.pageErrors.filter((e) => /Content Security Policy|Refused to/.test(e) && !/style/i.test(e))).toEqual([]);
  });

  it('a damaged workbook, picked in the file window of the browser, shows its message by the file button', async () => {
    const { page } = s;
    // A new study while the sample's edit (age 67) is unsaved: the app asks first.
    await page.getByRole('button', { name: /Start/ }).first().click();
    await page.getByRole('button', { name: 'start a new study from scratch' }).click();
    const question = page.getByTestId('question');
    await question.getByText(/has changes that are not saved/).waitFor({ timeout: 10_000 });
    await shot(page, '08-unsaved-question');
    await question.getByRole('button', { name: 'Discard the changes' }).click();
    await page.getByRole('heading', { name: 'Rule', level: 1 }).waitFor();
    await page.getByRole('button', { name: /^○?✓?\s*Data/ }).click();
    await page.locator('#data-files').setInputFiles({ name: 'applicants.xlsx', mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', buffer: Buffer.from('APPLICANT_ID,HH_INCOME\nA-1,100\n') });
    const message = page.getByText(/named like an Excel workbook but holds plain text/).first();
    await message.waitFor({ timeout: 60_000 }).catch(async (e) => { await shot(page, 'debug-bad'); throw e; });
    await shot(page, '08-data-bad-workbook');
  });
});
