// One run, one truth, in the browser (issue 9's done-when): (a) a limit changed after a run marks
// Evidence, Map and Memo "out of date"; (b) a reload restores the open study with its unsaved edit
// and the last run; (c) cancel while the data are read writes nothing and records no run; (d) a
// reopened run shows its map and its memo files without running the study again.

import { existsSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSession, shot, type Session } from './browser.ts';

let s: Session;
beforeAll(async () => { s = await openSession(); });
afterAll(async () => { await s?.close(); });

const api = async (method: string, args: unknown) => (await (await fetch(`http://127.0.0.1:${s.server.port}/api/call`, {
  method: 'POST', headers: { 'X-Fenceline-Token': s.server.token }, body: JSON.stringify({ method, args }),
})).json()) as { ok: boolean; value: never };

const step = (name: string) => s.page.getByRole('navigation', { name: 'Steps of a study' }).getByRole('button', { name: new RegExp(`^[○✓]?\\s*${name}\\b`) });
const runFolders = () => (existsSync(join(s.workspace, 'runs')) ? readdirSync(join(s.workspace, 'runs')) : []);

describe('one run, one truth', () => {
  it('marks a changed study out of date, survives a reload, cancels cleanly and reopens a run', { timeout: 900_000 }, async () => {
    const { page } = s;
    await page.goto(s.server.url);
    await page.getByRole('button', { name: /Winter energy credit/ }).click();
    const reading = page.getByTestId('reading');
    await expect.poll(() => reading.textContent(), { timeout: 30_000 }).toMatch(/at least 65/);

    // A first run of the sample as it is.
    await step('Data').click();
    await expect.poll(() => page.getByTestId('data-report').textContent(), { timeout: 120_000 }).toMatch(/will be used/);
    await step('Run').click();
    await page.getByRole('button', { name: 'Run the study' }).click();
    await page.getByTestId('run-done').waitFor({ timeout: 300_000 });
    await step('Evidence').click();
    await page.getByTestId('effect-verdict').first().waitFor();
    expect(await page.getByTestId('out-of-date').count()).toBe(0);

    // (a) The age limit 65 → 60 after the run: every screen that shows the run says so.
    await step('Rule').click();
    const ageLimit = page.locator('input[id="program-rule-all-1-any-0--limit"]');
    await ageLimit.fill('60');
    await expect.poll(() => reading.textContent(), { timeout: 30_000 }).toMatch(/at least 60/);
    for (const screen of ['Evidence', 'Map', 'Memo']) {
      await step(screen).click();
      const banner = page.getByTestId('out-of-date');
      await expect.poll(() => banner.textContent(), { timeout: 30_000 }).toMatch(/These results are out of date: the study changed since run 1\./);
      await shot(page, `10-out-of-date-${screen.toLowerCase()}`);
      expect(await step(screen).textContent()).toMatch(/to do/);
    }

    // (b) Reload: the study comes back with its unsaved edit, on the step it was on, with the run.
    await page.waitForTimeout(1500); // the session is kept half a second after the last change
    await page.reload();
    await page.getByRole('heading', { name: 'Memo', level: 1 }).waitFor({ timeout: 60_000 });
    await expect.poll(() => page.getByTestId('out-of-date').textContent(), { timeout: 30_000 }).toMatch(/since run 1/);
    await step('Rule').click();
    expect(await page.locator('input[id="program-rule-all-1-any-0--limit"]').inputValue()).toBe('60');
    await step('Evidence').click();
    await page.getByTestId('effect-verdict').first().waitFor({ timeout: 30_000 });
    await shot(page, '11-after-reload');

    // (c) Cancel while the data are read: "cancelled", no file written, no run recorded.
    const foldersBefore = runFolders().length;
    const runsBefore = ((await api('workspace.recent', {})).value as { runs: unknown[] }).runs.length;
    await step('Data').click();
    await expect.poll(() => page.getByTestId('data-report').textContent(), { timeout: 120_000 }).toMatch(/will be used/);
    await step('Run').click();
    await page.getByRole('button', { name: 'Run the study' }).click();
    await page.getByText(/Reading the data/).first().waitFor({ timeout: 60_000 });
    await page.getByRole('button', { name: 'Cancel' }).click();
    await page.getByText(/The run was cancelled; nothing was recorded\./).waitFor({ timeout: 30_000 });
    await shot(page, '12-cancelled');
    await page.waitForTimeout(2000);
    expect(runFolders().length).toBe(foldersBefore);
    expect(((await api('workspace.recent', {})).value as { runs: unknown[] }).runs.length).toBe(runsBefore);

    // (d) Reopen run 1 from Start: its map and its memo files, without running the study.
    await step('Start').click();
    await page.getByRole('button', { name: /Winter energy credit/ }).last().waitFor();
    const recentRun = page.locator('section[aria-labelledby="recent-h"] li', { hasText: 'run 1,' }).getByRole('button');
    await recentRun.click();
    const question = page.getByTestId('question');
    if (await question.getByText(/not saved/).isVisible().catch(() => false)) await question.getByRole('button', { name: 'Discard the changes' }).click();
    await page.getByTestId('effect-verdict').first().waitFor({ timeout: 60_000 });
    expect(await page.getByTestId('out-of-date').count()).toBe(0);
    await step('Map').click();
    await page.getByTestId('map-chart').locator('canvas').waitFor({ timeout: 60_000 });
    // the edge along one input too (distance and density), from the same stored run
    await page.getByTestId('edge-figures').locator('canvas').first().waitFor({ timeout: 60_000 });
    await shot(page, '13-reopened-run-map');
    await step('Memo').click();
    const files = await page.getByTestId('memo-files').locator('li .hint').allTextContents();
    expect(files.length).toBeGreaterThan(0);
    for (const f of files) expect(existsSync(f), f).toBe(true);
    await shot(page, '13-reopened-run-memo');
    expect(runFolders().length).toBe(foldersBefore); // nothing was run again
  });
});
