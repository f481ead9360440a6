// Document → one self-contained HTML file: inline CSS, figures as data: URIs, no scripts, no
// external requests (no http(s) references at all), and @media print rules so it prints cleanly
// (table headers repeat on each printed page through display: table-header-group, CSS 2.1 §17.2).

import type { Block, Document, Inline, Section, Table, TextStyle } from '../model/document.ts';
import {
  NOTE_TONE_LABEL, assertRenderable, captionNumbers, cellText, footnoteNumbers, inlineText,
  numberedFootnotes, tableLegend,
} from '../model/format.ts';
import { figurePngs } from './figures.ts';
import type { RenderOptions } from './options.ts';

export function escapeHtml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

const CSS = `
:root { --ink: #1a1a1a; --muted: #555; --rule: #bfbfbf; --key: #eaf3fb; --key-edge: #0072b2;
  --caution: #fff4e0; --caution-edge: #b35c00; --limit: #f2f2f2; --limit-edge: #555; }
* { box-sizing: border-box; }
html { font-family: "DejaVu Sans", "Segoe UI", Arial, Helvetica, sans-serif; color: var(--ink); line-height: 1.5; }
body { margin: 0 auto; max-width: 52rem; padding: 2rem 1.25rem 4rem; font-size: 1rem; }
header.title-block { border-bottom: 2px solid var(--ink); margin-bottom: 1.5rem; padding-bottom: 1rem; }
header.title-block h1 { font-size: 1.9rem; line-height: 1.2; margin: 0 0 .4rem; }
header.title-block .subtitle { font-size: 1.15rem; margin: 0 0 .6rem; color: var(--muted); }
header.title-block .date-line { margin: 0 0 .6rem; font-weight: bold; }
header.title-block ul.provenance { list-style: none; margin: 0; padding: 0; font-size: .85rem; color: var(--muted); overflow-wrap: anywhere; }
h2 { font-size: 1.45rem; margin: 2rem 0 .6rem; border-bottom: 1px solid var(--rule); padding-bottom: .2rem; }
h3 { font-size: 1.2rem; margin: 1.5rem 0 .5rem; }
h4 { font-size: 1.05rem; margin: 1.2rem 0 .4rem; }
p { margin: .5rem 0 .8rem; }
sup.fn a { text-decoration: none; }
.key-finding { border: 2px solid var(--key-edge); background: var(--key); padding: .8rem 1.1rem; margin: 1rem 0 1.4rem; }
.key-finding .kf-title { font-weight: bold; font-size: 1.1rem; margin: 0 0 .4rem; }
aside.note { border-left: 5px solid var(--limit-edge); background: var(--limit); padding: .5rem 1rem; margin: 1rem 0; }
aside.note.caution { border-left-color: var(--caution-edge); background: var(--caution); }
aside.note .note-title { font-weight: bold; margin: .2rem 0; }
figure { margin: 1.2rem 0; }
figure img { width: 100%; height: auto; border: 1px solid #e0e0e0; }
figcaption, caption { font-size: .92rem; text-align: left; margin: .35rem 0; }
.label { font-weight: bold; }
table { border-collapse: collapse; width: 100%; margin: .6rem 0 .3rem; font-size: .92rem; }
.table-wrap { max-width: 100%; overflow-x: auto; }
.table-wrap:focus { outline: 2px solid var(--key-edge); outline-offset: 2px; }
thead th { overflow-wrap: normal; word-break: normal; hyphens: manual; }
@media (max-width: 40rem) {
  body { padding: 1rem .6rem 3rem; }
  table { font-size: .8rem; }
  th, td { padding: .2rem .3rem; }
}
th, td { padding: .25rem .5rem; border-bottom: 1px solid #e3e3e3; vertical-align: top; }
thead th { border-bottom: 2px solid var(--ink); text-align: left; }
tbody th { font-weight: normal; }
tr.total td, tr.total th { font-weight: bold; border-top: 1.5px solid var(--ink); }
td.num { font-variant-numeric: tabular-nums; white-space: nowrap; }
td.suppressed { color: var(--muted); }
.table-notes { font-size: .85rem; color: var(--muted); margin: 0 0 1.2rem; }
.table-notes p { margin: .15rem 0; }
dl.glossary dt { font-weight: bold; margin-top: .6rem; }
dl.glossary dd { margin: 0 0 0 1.5rem; }
section.footnotes { border-top: 1px solid var(--rule); margin-top: 2.5rem; font-size: .88rem; }
.page-break { height: 0; }
@media print {
  @page { margin: 18mm 16mm; }
  html { font-size: 10.5pt; }
  body { max-width: none; padding: 0; }
  h2, h3, h4 { break-after: avoid; page-break-after: avoid; }
  figure, aside.note, .key-finding, tr, dl.glossary dt { break-inside: avoid; page-break-inside: avoid; }
  thead { display: table-header-group; }
  .key-finding, aside.note { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  .page-break, section.page-break-before { break-before: page; page-break-before: always; }
  a { color: inherit; text-decoration: none; }
}
`;

interface Ctx {
  doc: Document;
  fn: Map<string, number>;
  captions: Map<string, string>;
  pngs: Map<string, Buffer>;
}

function styled(text: string, style: TextStyle | undefined): string {
  switch (style) {
    case 'bold': return `<strong>${text}</strong>`;
    case 'italic': return `<em>${text}</em>`;
    case 'boldItalic': return `<strong><em>${text}</em></strong>`;
    default: return text;
  }
}

function mark(ctx: Ctx, id: string | undefined): string {
  if (!id) return '';
  const n = ctx.fn.get(id);
  return n === undefined ? '' : `<sup class="fn"><a href="#fn-${n}" aria-label="note ${n}">${n}</a></sup>`;
}

function runs(ctx: Ctx, list: readonly Inline[]): string {
  return list.map((r) => {
    const text = escapeHtml(inlineText(r, ctx.doc.suppression));
    const body = r.kind === 'suppressed' ? `<span class="suppressed" title="hidden small count">${text}</span>` : text;
    return styled(body, r.style) + mark(ctx, r.footnote);
  }).join('');
}

function table(ctx: Ctx, t: Table): string {
  const label = ctx.captions.get(t.id) ?? 'Table';
  const head = t.columns.map((c) => `<th scope="col" style="text-align:${c.align}">${escapeHtml(c.header)}</th>`).join('');
  const body = t.rows.map((row) => {
    const cells = row.cells.map((cell, i) => {
      const col = t.columns[i]!;
      const cls = [cell.kind === 'number' || cell.kind === 'suppressed' ? 'num' : '', cell.kind === 'suppressed' ? 'suppressed' : '']
        .filter(Boolean).join(' ');
      const text = escapeHtml(cellText(cell, col, ctx.doc.suppression));
      const fn = cell.kind === 'text' || cell.kind === 'number' ? mark(ctx, cell.footnote) : '';
      const tag = i === 0 && col.align === 'left' && cell.kind === 'text' ? 'th scope="row"' : 'td';
      const close = tag.startsWith('th') ? 'th' : 'td';
      return `<${tag}${cls ? ` class="${cls}"` : ''} style="text-align:${col.align}">${text}${fn}</${close}>`;
    }).join('');
    return `<tr${row.emphasis === 'total' ? ' class="total"' : ''}>${cells}</tr>`;
  }).join('\n');
  const notes = [
    ...(t.notes ?? []).map((n) => `<p>${runs(ctx, n)}</p>`),
    ...tableLegend(t, ctx.doc.suppression).map((l) => `<p>${escapeHtml(l)}</p>`),
  ];
  // On a narrow screen a wide table scrolls inside its own box instead of widening the page; the box
  // is a labelled region that takes keyboard focus so it can be scrolled without a mouse (WCAG 2.1,
  // success criteria 1.4.10 Reflow and 2.1.1 Keyboard).
  return `<div class="table-wrap" role="region" tabindex="0" aria-label="${escapeHtml(`${label}. ${t.caption}`)}"><table id="${escapeHtml(t.id)}">
<caption><span class="label">${escapeHtml(label)}.</span> ${escapeHtml(t.caption)}</caption>
<thead><tr>${head}</tr></thead>
<tbody>
${body}
</tbody>
</table></div>
${notes.length ? `<div class="table-notes">${notes.join('')}</div>` : ''}`;
}

function block(ctx: Ctx, b: Block): string {
  switch (b.kind) {
    case 'paragraph': return `<p>${runs(ctx, b.runs)}</p>`;
    case 'list': {
      const tag = b.ordered ? 'ol' : 'ul';
      return `<${tag}>${b.items.map((i) => `<li>${runs(ctx, i)}</li>`).join('')}</${tag}>`;
    }
    case 'keyFinding':
      return `<section class="key-finding" aria-label="Key finding"><p class="kf-title">${escapeHtml(b.title)}</p>${b.body.map((x) => block(ctx, x)).join('')}</section>`;
    case 'note': {
      const label = NOTE_TONE_LABEL[b.tone];
      const title = b.title ? `${label}: ${b.title}` : label;
      return `<aside class="note ${b.tone}" role="note"><p class="note-title">${escapeHtml(title)}</p>${b.body.map((p) => block(ctx, p)).join('')}</aside>`;
    }
    case 'glossary':
      return `<dl class="glossary">${b.entries.map((e) => `<dt>${escapeHtml(e.term)}</dt><dd>${runs(ctx, e.definition)}</dd>`).join('')}</dl>`;
    case 'table': return table(ctx, b);
    case 'figure': {
      const png = ctx.pngs.get(b.id);
      const label = ctx.captions.get(b.id) ?? 'Figure';
      const img = png ? `<img src="data:image/png;base64,${png.toString('base64')}" alt="${escapeHtml(b.alt)}">` : '';
      return `<figure id="${escapeHtml(b.id)}">${img}<figcaption><span class="label">${escapeHtml(label)}.</span> ${escapeHtml(b.caption)}</figcaption></figure>`;
    }
    case 'pageBreak': return '<div class="page-break" aria-hidden="true"></div>';
  }
}

function section(ctx: Ctx, s: Section, level: number): string {
  // The document title is the page's h1, so section levels 1–3 are h2–h4.
  const h = `h${level + 1}`;
  const cls = s.pageBreakBefore ? ' class="page-break-before"' : '';
  return `<section id="${escapeHtml(s.id)}"${cls}>
<${h}>${escapeHtml(s.heading)}</${h}>
${s.blocks.map((b) => block(ctx, b)).join('\n')}
${(s.sections ?? []).map((c) => section(ctx, c, Math.min(3, level + 1))).join('\n')}
</section>`;
}

export async function renderHtml(doc: Document, opts: RenderOptions = {}): Promise<string> {
  assertRenderable(doc);
  const ctx: Ctx = { doc, fn: footnoteNumbers(doc), captions: captionNumbers(doc), pngs: await figurePngs(doc, opts) };
  const tb = doc.title;
  const notes = numberedFootnotes(doc);
  return `<!DOCTYPE html>
<html lang="${escapeHtml(tb.language ?? 'en')}">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="Fenceline">
<meta name="dcterms.created" content="${escapeHtml(tb.createdAt)}">
<title>${escapeHtml(tb.title)}</title>
<style>${CSS}</style>
</head>
<body>
<header class="title-block">
<h1>${escapeHtml(tb.title)}</h1>
${tb.subtitle ? `<p class="subtitle">${escapeHtml(tb.subtitle)}</p>` : ''}
<p class="date-line">${escapeHtml(tb.dateLine)}</p>
<ul class="provenance">${tb.provenance.map((l) => `<li>${escapeHtml(l)}</li>`).join('')}</ul>
</header>
<main>
${doc.sections.map((s) => section(ctx, s, 1)).join('\n')}
</main>
${notes.length ? `<section class="footnotes" aria-label="Notes"><h2>Notes</h2><ol>${notes.map((n) => `<li id="fn-${n.number}">${runs(ctx, n.body)}</li>`).join('')}</ol></section>` : ''}
</body>
</html>
`;
}
