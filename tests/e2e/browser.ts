// Shared set-up of the end-to-end tests: browser mode on a free port with a fresh workspace, and
// Debian's Chromium (playwright-core, no bundled browser) with a fresh profile and no network
// services of its own.

import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { startServer, type RunningServer } from '../../main/serve.ts';

export const CHROMIUM = '/usr/bin/chromium';
export const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'];
export const ARTIFACTS = join(import.meta.dirname, '..', 'artifacts');

export interface Session {
  server: RunningServer;
  context: BrowserContext;
  page: Page;
  workspace: string;
  scratch: string;
  pageErrors: string[];
  close(): Promise<void>;
}

export async function openSession(): Promise<Session> {
  if (!existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} is missing: install Debian's chromium package (apt-get install -y chromium), as .ci/run does.`);
  if (!existsSync(join(import.meta.dirname, '..', '..', 'dist', 'renderer', 'index.html'))) throw new Error('The renderer is not built: run npm run test:e2e (it builds first) or npm run build:app.');
  mkdirSync(ARTIFACTS, { recursive: true });
  const scratch = mkdtempSync(join(tmpdir(), 'fenceline-e2e-'));
  const workspace = join(scratch, 'workspace');
  const server = await startServer({ port: 0, workspaceDir: workspace });
  const context = await chromium.launchPersistentContext(join(scratch, 'profile'), {
    executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true, viewport: { width: 1280, height: 800 },
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const pageErrors: string[] = [];
  page.on('pageerror', (e) => pageErrors.push(e.message));
  page.on('console', (m) => { if (m.type() === 'error') pageErrors.push(m.text()); });
  return {
    server, context, page, workspace, scratch, pageErrors,
    async close() {
      await context.close();
      await server.close();
      rmSync(scratch, { recursive: true, force: true });
    },
  };
}

export async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(ARTIFACTS, `${name}.png`), fullPage: true });
}
