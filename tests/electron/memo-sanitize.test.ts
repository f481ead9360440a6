// The memo preview's sanitizer (app/lib/memo-preview.ts, DOMPurify) run where it runs — in a
// browser (Debian's Chromium through playwright-core) — on the attacks a hand-written cleaner
// missed (xlink:href, srcset, formaction) and the usual ones (script, handlers, javascript: links,
// styles, forms, frames). The memo's own content (headings, tables, inline PNG figures, links
// within the memo) is kept.

import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { build } from 'esbuild';
import { chromium, type Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const CHROMIUM = '/usr/bin/chromium';
let browser: Browser | null = null;
let bundle = '';

beforeAll(async () => {
  if (!existsSync(CHROMIUM)) return;
  const out = await build({
    stdin: { contents: "import { cleanMemo } from './app/lib/memo-preview.ts'; (globalThis as any).cleanMemo = cleanMemo;", loader: 'ts', resolveDir: join(__dirname, '../..') },
    bundle: true, format: 'iife', write: false, platform: 'browser', logLevel: 'error',
  });
  bundle = out.outputFiles[0]!.text;
  browser = await chromium.launch({ executablePath: CHROMIUM, args: ['--headless', '--no-sandbox', '--disable-gpu'], headless: true });
}, 60_000);
afterAll(async () => { await browser?.close(); });

const PNG = 'data:image/png;base64,iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==';
const ATTACK = `
<h1>Memo</h1><table><tr><td>1.2</td></tr></table>
<figure><img src="${PNG}" alt="chart" srcset="https://example.invalid/x.png 2x"></figure>
<a href="#s2">see section 2</a>
<a href="javascript:alert(1)">js</a><a href="https://example.invalid/">out</a>
<svg><a xlink:href="javascript:alert(2)"><text>x</text></a></svg>
<form action="https://example.invalid"><button formaction="javascript:alert(3)">go</button></form>
<img src="x" onerror="alert(4)"><script>alert(5)</script><style>body{display:none}</style>
<p style="position:fixed" onclick="alert(6)">text</p><iframe src="https://example.invalid"></iframe>
<math><mtext><table><mglyph><style><img src=x onerror=alert(7)></style></mglyph></table></mtext></math>`;

describe('the memo preview sanitizer (DOMPurify in the renderer)', () => {
  it('removes every active or outgoing part and keeps the memo content', async (ctx) => {
    if (!browser) ctx.skip();
    const page = await browser!.newPage();
    await page.setContent('<!doctype html><html><body></body></html>');
    await page.addScriptTag({ content: bundle });
    const html = await page.evaluate((text) => {
      const doc = new (globalThis as any).DOMParser().parseFromString(text, 'text/html');
      (globalThis as any).cleanMemo(doc.body);
      return doc.body.innerHTML;
    }, ATTACK);
    await page.close();
    for (const bad of ['javascript:', 'xlink:href', 'srcset', 'formaction', 'onerror', 'onclick', '<script', '<style', 'style=', '<form', '<iframe', 'example.invalid', '<svg', '<math']) {
      expect(html, bad).not.toContain(bad);
    }
    expect(html).toContain('<h1>Memo</h1>');
    expect(html).toContain('<td>1.2</td>');
    expect(html).toContain(`src="${PNG}"`);
    expect(html).toContain('href="#s2"');
  }, 60_000);
});
