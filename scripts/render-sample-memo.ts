// Writes the invented sample memo (tests/report/sample-document.ts) in every format to a folder:
//   npx tsx scripts/render-sample-memo.ts <folder>
// memo.pdf, memo.docx, memo.html, tables.xlsx, memo.json (the document tree) and one PNG per figure,
// for looking at the layout by eye.

import { mkdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { sampleDocument } from '../tests/report/sample-document.ts';
import { renderFigures } from '../main/report/render/figures.ts';
import { renderHtml } from '../main/report/render/html.ts';
import { renderPdf } from '../main/report/render/pdf.ts';
import { renderDocx } from '../main/report/render/docx.ts';
import { renderXlsx } from '../main/report/render/xlsx.ts';

async function main(): Promise<void> {
  const target = process.argv[2];
  if (!target) {
    process.stderr.write('Give the folder to write to, e.g.: npx tsx scripts/render-sample-memo.ts /tmp/memo\n');
    process.exit(2);
  }
  const dir = resolve(target);
  mkdirSync(dir, { recursive: true });
  const { doc } = sampleDocument();
  const figures = await renderFigures(doc);
  for (const [id, png] of figures) writeFileSync(join(dir, `${id}.png`), png);
  writeFileSync(join(dir, 'memo.json'), JSON.stringify(doc, null, 2));
  const opts = { figures };
  const outputs: Array<[string, () => Promise<Buffer | string>]> = [
    ['memo.pdf', () => renderPdf(doc, opts)],
    ['memo.html', () => renderHtml(doc, opts)],
    ['memo.docx', () => renderDocx(doc, opts)],
    ['tables.xlsx', () => renderXlsx(doc, opts)],
  ];
  for (const [name, make] of outputs) writeFileSync(join(dir, name), await make());
  process.stdout.write(`Wrote the sample memo to ${dir}\n`);
}

main().catch((e: unknown) => {
  process.stderr.write(`${e instanceof Error ? e.stack ?? e.message : String(e)}\n`);
  process.exit(1);
});
