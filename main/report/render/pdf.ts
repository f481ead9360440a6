// Document → PDF with pdfkit: embedded DejaVu fonts (subset by pdfkit), a title block, headings that
// keep with what follows, the key-finding box, tables that split across pages and repeat their header
// row, figures as PNGs, footnote marks with the notes collected at the end, and "Page X of Y" footers.
// The creation date comes from the document, so the same document gives the same bytes.

import { join } from 'node:path';
import PDFDocument from 'pdfkit';
import type { Block, BulletList, Document, Figure, Inline, Note, Paragraph, Section, Table, TextStyle } from '../model/document.ts';
import {
  NOTE_TONE_LABEL, assertRenderable, captionNumbers, cellText, footnoteNumbers, inlineText, numberedFootnotes,
  superscriptDigits, tableLegend,
} from '../model/format.ts';
import { dejavuFontDir } from './chart-png.ts';
import { figurePngs, pngSize } from './figures.ts';
import type { RenderOptions } from './options.ts';

export interface PdfOptions extends RenderOptions {
  /** Paper size; US Letter when absent. */
  pageSize?: 'LETTER' | 'A4';
}

type Pdf = InstanceType<typeof PDFDocument>;

const FONTS = {
  regular: 'DejaVuSans.ttf',
  bold: 'DejaVuSans-Bold.ttf',
  italic: 'DejaVuSans-Oblique.ttf',
  boldItalic: 'DejaVuSans-BoldOblique.ttf',
  cond: 'DejaVuSansCondensed.ttf',
  condBold: 'DejaVuSansCondensed-Bold.ttf',
  condItalic: 'DejaVuSansCondensed-Oblique.ttf',
} as const;
type FontKey = keyof typeof FONTS;

const INK = '#1a1a1a';
const MUTED = '#555555';
const RULE = '#bfbfbf';
const MARGIN = { top: 58, bottom: 62, left: 62, right: 62 };
const BODY_SIZE = 10;
const PARA_GAP = 6;

/**
 * Each font file parsed once per process, shared by the memo's two documents (the page layout and
 * the scratch one that measures) and by every later memo: pdfkit takes a parsed font in
 * registerFont (PDFFontFactory.open accepts any object with a `layout` method) and builds each
 * document's own subset from it, so the output is the same bytes; parsing the font tables was
 * about a fifth of a memo's PDF time. The font is parsed by pdfkit's own loader, on a probe
 * document that is never written; should a later pdfkit keep the parsed font elsewhere, the
 * path is registered as before (each document parses it again).
 */
const parsedFonts = new Map<FontKey, object | string>();
let probe: Pdf | null = null;

function parsedFont(key: FontKey): object | string {
  let font = parsedFonts.get(key);
  if (font === undefined) {
    const path = join(dejavuFontDir(), FONTS[key]);
    probe ??= new PDFDocument({ autoFirstPage: false });
    probe.registerFont(key, path);
    probe.font(key);
    const opened = (probe as unknown as { _font?: { font?: { layout?: unknown } } })._font?.font;
    font = opened !== undefined && typeof opened.layout === 'function' ? opened : path;
    parsedFonts.set(key, font);
  }
  return font;
}

function registerFonts(pdf: Pdf): void {
  for (const key of Object.keys(FONTS) as FontKey[]) pdf.registerFont(key, parsedFont(key) as string);
}

function fontFor(style: TextStyle | undefined, condensed = false): FontKey {
  if (condensed) return style === 'bold' || style === 'boldItalic' ? 'condBold' : style === 'italic' ? 'condItalic' : 'cond';
  switch (style) {
    case 'bold': return 'bold';
    case 'italic': return 'italic';
    case 'boldItalic': return 'boldItalic';
    default: return 'regular';
  }
}

type Struct = ReturnType<Pdf['struct']>;

interface Layout {
  pdf: Pdf;
  /** The structure element new content goes into (tagged PDF, ISO 32000-1 §14.8). */
  parent: Struct;
  /** A second document on a very tall page, used only to measure how tall text will be. */
  scratch: Pdf;
  doc: Document;
  fn: Map<string, number>;
  captions: Map<string, string>;
  pngs: Map<string, Buffer>;
  left: number;
  width: number;
}

// Tagged PDF (ISO 32000-1 §14.8; pdfkit's structure support): every piece of text and every figure is
// marked content inside a structure element (Sect, H1–H4, P, L/LI/Lbl/LBody, Table/TR/TH/TD, Figure
// with its alternative text); rules, fills, repeated table headers and page footers are artifacts.

/** Draw inside a new structure element of this type (its content marked as belonging to it). */
function tag(l: Layout, type: string, draw: () => void, options: { alt?: string } = {}): void {
  // Elements are ended all at once by the root at the end (ending each as it is written makes pdfkit
  // re-check the whole tree every time).
  l.parent.add(l.pdf.struct(type, options, [draw]));
}

/** A structure element that holds other elements (a section, a list, a table, a row). */
function group(l: Layout, type: string, body: () => void): void {
  const el = l.pdf.struct(type);
  l.parent.add(el);
  const prev = l.parent;
  l.parent = el;
  try { body(); } finally { l.parent = prev; }
}

/** Decoration that is not part of the content (rules, fills, footers, repeated headers). */
function artifact(l: Layout, draw: () => void, type?: 'Pagination' | 'Layout'): void {
  l.pdf.markContent('Artifact', type ? { type } : undefined);
  draw();
  l.pdf.endMarkedContent();
}

const bottom = (l: Layout) => l.pdf.page.height - MARGIN.bottom;
const room = (l: Layout) => bottom(l) - l.pdf.y;
const atTop = (l: Layout) => l.pdf.y <= MARGIN.top + 0.5;

function newPage(l: Layout): void {
  l.pdf.addPage();
  l.pdf.x = l.left;
  l.pdf.y = MARGIN.top;
}

function ensure(l: Layout, height: number): void {
  if (room(l) < height && !atTop(l)) newPage(l);
}

function markText(l: Layout, id: string | undefined): string {
  if (!id) return '';
  const n = l.fn.get(id);
  return n === undefined ? '' : superscriptDigits(n);
}

interface RunOpts { size: number; color?: string; align?: 'left' | 'right' | 'center'; condensed?: boolean; baseStyle?: TextStyle }

/** Write inline runs at (x, y) within width on `target`; leaves target.y under the text. */
function writeRuns(l: Layout, target: Pdf, runs: readonly Inline[], x: number, y: number, width: number, o: RunOpts): void {
  const parts = runs
    .map((r) => ({ text: inlineText(r, l.doc.suppression) + markText(l, r.footnote), style: r.style ?? o.baseStyle }))
    .filter((p) => p.text.length > 0);
  if (parts.length === 0) { target.y = y; return; }
  target.fillColor(o.color ?? INK);
  parts.forEach((p, i) => {
    target.font(fontFor(p.style, o.condensed)).fontSize(o.size);
    const opts = { width, align: o.align ?? 'left', continued: i < parts.length - 1, lineGap: 1.5 };
    if (i === 0) target.text(p.text, x, y, opts); else target.text(p.text, opts);
  });
}

function measureRuns(l: Layout, runs: readonly Inline[], width: number, o: RunOpts): number {
  writeRuns(l, l.scratch, runs, 0, 0, width, o);
  const h = l.scratch.y;
  return h;
}

const plain = (text: string, style?: TextStyle): Inline => (style ? { kind: 'text', text, style } : { kind: 'text', text });

function paragraph(l: Layout, p: Paragraph, x = l.left, width = l.width, size = BODY_SIZE): void {
  ensure(l, size * 2.6);
  tag(l, 'P', () => writeRuns(l, l.pdf, p.runs, x, l.pdf.y, width, { size }));
  l.pdf.y += PARA_GAP;
}

function list(l: Layout, b: BulletList, x = l.left, width = l.width): void {
  // A short list is kept whole on one page rather than leaving an item or two alone on the next.
  const whole = b.items.reduce((h, item) => h + measureRuns(l, item, width - 20, { size: BODY_SIZE }) + 2, 0);
  if (whole < (l.pdf.page.height - MARGIN.top - MARGIN.bottom) / 3) ensure(l, whole);
  group(l, 'L', () => b.items.forEach((item, i) => {
    ensure(l, BODY_SIZE * 2.6);
    const y = l.pdf.y;
    const marker = b.ordered ? `${i + 1}.` : '•';
    group(l, 'LI', () => {
      tag(l, 'Lbl', () => { l.pdf.font('regular').fontSize(BODY_SIZE).fillColor(INK).text(marker, x + 4, y, { width: 16, lineBreak: false }); });
      tag(l, 'LBody', () => writeRuns(l, l.pdf, item, x + 20, y, width - 20, { size: BODY_SIZE }));
    });
    l.pdf.y += 2;
  }));
  l.pdf.y += PARA_GAP - 2;
}

const headingSize = (level: 1 | 2 | 3) => (level === 1 ? 15 : level === 2 ? 12.5 : 11);

/** Height of a heading as drawn (its text, the space above it and the rule under a level-1 heading). */
function headingHeight(l: Layout, text: string, level: 1 | 2 | 3): number {
  return measureRuns(l, [plain(text, 'bold')], l.width, { size: headingSize(level) }) + (level === 1 ? 18 : 11);
}

function heading(l: Layout, text: string, level: 1 | 2 | 3, keepWith = 60): void {
  const size = headingSize(level);
  // Keep with next: the heading moves to a new page unless what must follow it fits under it.
  ensure(l, headingHeight(l, text, level) + keepWith);
  if (!atTop(l)) l.pdf.y += level === 1 ? 12 : 8;
  tag(l, `H${level + 1}`, () => { l.pdf.font('bold').fontSize(size).fillColor(INK).text(text, l.left, l.pdf.y, { width: l.width }); });
  if (level === 1) {
    const y = l.pdf.y + 1;
    artifact(l, () => l.pdf.moveTo(l.left, y).lineTo(l.left + l.width, y).lineWidth(0.6).strokeColor(RULE).stroke(), 'Layout');
    l.pdf.y = y + 5;
  } else {
    l.pdf.y += 3;
  }
}

/** Content of a box (key finding, note), measured in the scratch document first. */
type BoxContent = Array<{ kind: 'title'; text: string } | Paragraph | BulletList>;

function boxHeight(l: Layout, content: BoxContent, width: number): number {
  let h = 0;
  for (const c of content) {
    if (c.kind === 'title') h += measureRuns(l, [plain(c.text, 'bold')], width, { size: BODY_SIZE + 1 }) + 4;
    else if (c.kind === 'paragraph') h += measureRuns(l, c.runs, width, { size: BODY_SIZE }) + PARA_GAP;
    else for (const item of c.items) h += measureRuns(l, item, width - 20, { size: BODY_SIZE }) + 2;
  }
  return h;
}

function box(l: Layout, content: BoxContent, style: { fill: string; edge: string; leftBarOnly: boolean }): void {
  const pad = 10;
  const inner = l.width - 2 * pad - (style.leftBarOnly ? 4 : 0);
  const h = boxHeight(l, content, inner) + 2 * pad - PARA_GAP / 2;
  ensure(l, h + 8);
  const x0 = l.left;
  const y0 = l.pdf.y + 2;
  if (h <= bottom(l) - y0) {
    artifact(l, () => {
      l.pdf.save();
      l.pdf.rect(x0, y0, l.width, h).fill(style.fill);
      if (style.leftBarOnly) l.pdf.rect(x0, y0, 4, h).fill(style.edge);
      else l.pdf.rect(x0, y0, l.width, h).lineWidth(1.5).strokeColor(style.edge).stroke();
      l.pdf.restore();
    }, 'Layout');
  }
  const x = x0 + pad + (style.leftBarOnly ? 4 : 0);
  l.pdf.y = y0 + pad;
  group(l, 'Div', () => {
    for (const c of content) {
      if (c.kind === 'title') {
        tag(l, 'P', () => writeRuns(l, l.pdf, [plain(c.text, 'bold')], x, l.pdf.y, inner, { size: BODY_SIZE + 1 }));
        l.pdf.y += 4;
      } else if (c.kind === 'paragraph') paragraph(l, c, x, inner);
      else list(l, c, x, inner);
    }
  });
  l.pdf.y = Math.max(l.pdf.y, y0 + h) + 10;
}

function note(l: Layout, n: Note): void {
  const label = NOTE_TONE_LABEL[n.tone];
  const title = n.title ? `${label}: ${n.title}` : label;
  const style = n.tone === 'caution'
    ? { fill: '#fff4e0', edge: '#b35c00', leftBarOnly: true }
    : { fill: '#f2f2f2', edge: '#555555', leftBarOnly: true };
  box(l, [{ kind: 'title', text: title }, ...n.body], style);
}

// ---------------------------------------------------------------------------------------------
// Tables

const CELL_PAD_X = 4;
const CELL_PAD_Y = 3;
const TABLE_SIZE = 8.5;
const KEEP_LAST_ROWS = 3;

function columnWidths(l: Layout, t: Table): number[] {
  const pdf = l.scratch;
  const natural = t.columns.map((col, i) => {
    pdf.font('condBold').fontSize(TABLE_SIZE);
    let w = pdf.widthOfString(col.header);
    pdf.font('cond').fontSize(TABLE_SIZE);
    for (const r of t.rows) {
      const c = r.cells[i]!;
      w = Math.max(w, pdf.widthOfString(cellText(c, col, l.doc.suppression) + ((c.kind === 'text' || c.kind === 'number') ? markText(l, c.footnote) : '')));
    }
    return Math.min(l.width * 0.6, Math.max(28, w + 2 * CELL_PAD_X + 1));
  });
  const weights = natural.map((n, i) => n * (t.columns[i]!.width ?? 1));
  const sumNatural = natural.reduce((a, b) => a + b, 0);
  if (sumNatural <= l.width) {
    // Narrow tables stay narrow (numbers near their labels); the spare width goes by the columns'
    // relative widths.
    const target = Math.min(l.width, Math.max(l.width * 0.6, sumNatural * 1.5));
    const spare = target - sumNatural;
    const wsum = t.columns.reduce((a, c) => a + (c.width ?? 1), 0);
    return natural.map((n, i) => n + spare * ((t.columns[i]!.width ?? 1) / wsum));
  }
  // Too wide: share the width by weight, but never below a column's minimum — the longest word of
  // its header (headers never split inside a word) and its longest number (numbers never wrap).
  const min = t.columns.map((col, i) => {
    pdf.font('condBold').fontSize(TABLE_SIZE);
    let m = Math.max(...col.header.split(/\s+/).map((w) => pdf.widthOfString(w)));
    pdf.font('cond').fontSize(TABLE_SIZE);
    for (const r of t.rows) {
      const c = r.cells[i]!;
      const txt = cellText(c, col, l.doc.suppression);
      const whole = c.kind === 'number' || c.kind === 'suppressed' || /^[-−+]?[\d.,]+\s?%?$/.test(txt);
      m = Math.max(m, whole ? pdf.widthOfString(txt) : Math.max(0, ...txt.split(/\s+/).map((w) => pdf.widthOfString(w))));
    }
    return Math.min(natural[i]!, m + 2 * CELL_PAD_X + 1);
  });
  const out = new Array<number>(natural.length).fill(0);
  const fixed = new Set<number>();
  for (let pass = 0; pass < natural.length; pass++) {
    const free = natural.map((_, i) => i).filter((i) => !fixed.has(i));
    const left = l.width - [...fixed].reduce((a, i) => a + out[i]!, 0);
    const wsum = free.reduce((a, i) => a + weights[i]!, 0);
    let changed = false;
    for (const i of free) {
      out[i] = (weights[i]! / wsum) * left;
      if (out[i]! < min[i]!) { out[i] = min[i]!; fixed.add(i); changed = true; }
    }
    if (!changed) break;
  }
  return out;
}

function rowTexts(l: Layout, t: Table, r: number): string[] {
  const row = t.rows[r]!;
  return row.cells.map((c, i) => cellText(c, t.columns[i]!, l.doc.suppression) + ((c.kind === 'text' || c.kind === 'number') ? markText(l, c.footnote) : ''));
}

function rowHeight(l: Layout, texts: string[], widths: number[], bold: boolean): number {
  const pdf = l.scratch;
  pdf.font(bold ? 'condBold' : 'cond').fontSize(TABLE_SIZE);
  let h = 0;
  texts.forEach((s, i) => {
    h = Math.max(h, pdf.heightOfString(s || ' ', { width: widths[i]! - 2 * CELL_PAD_X, lineGap: 1 }));
  });
  return h + 2 * CELL_PAD_Y;
}

/** One table row; `repeat` marks a header row repeated on a continuation page (an artifact: the
 *  structure already has the header once). */
function drawRow(l: Layout, t: Table, texts: string[], widths: number[], y: number, h: number, kind: 'header' | 'body' | 'total', repeat = false): void {
  const pdf = l.pdf;
  const tw = widths.reduce((a, b) => a + b, 0);
  if (kind === 'header') artifact(l, () => pdf.rect(l.left, y, tw, h).fill('#ececec'), 'Layout');
  const cells = () => {
    let x = l.left;
    texts.forEach((s, i) => {
      const w = widths[i]!;
      const draw = () => {
        pdf.font(kind === 'body' ? 'cond' : 'condBold').fontSize(TABLE_SIZE).fillColor(INK);
        pdf.text(s, x + CELL_PAD_X, y + CELL_PAD_Y, { width: w - 2 * CELL_PAD_X, align: t.columns[i]!.align, lineGap: 1 });
      };
      if (repeat) draw(); else tag(l, kind === 'header' ? 'TH' : 'TD', draw);
      x += w;
    });
  };
  if (repeat) artifact(l, cells, 'Pagination'); else group(l, 'TR', cells);
  const ruleY = y + h;
  artifact(l, () => {
    if (kind === 'header') {
      pdf.moveTo(l.left, ruleY).lineTo(l.left + tw, ruleY).lineWidth(1).strokeColor(INK).stroke();
    } else {
      if (kind === 'total') pdf.moveTo(l.left, y).lineTo(l.left + tw, y).lineWidth(0.9).strokeColor(INK).stroke();
      pdf.moveTo(l.left, ruleY).lineTo(l.left + tw, ruleY).lineWidth(0.3).strokeColor('#d6d6d6').stroke();
    }
  }, 'Layout');
}

/** Caption, header and the first rows of a table (all of it when short): what must not be parted from its heading. */
function tableLeadHeight(l: Layout, t: Table): number {
  const widths = columnWidths(l, t);
  const headerH = rowHeight(l, t.columns.map((c) => c.header), widths, true);
  const captionH = measureRuns(l, [plain(`${l.captions.get(t.id) ?? 'Table'}. `, 'bold'), plain(t.caption)], l.width, { size: BODY_SIZE - 0.5 });
  const rows = t.rows.slice(0, Math.min(t.rows.length, 8)).map((row, r) => rowHeight(l, rowTexts(l, t, r), widths, row.emphasis === 'total'));
  return captionH + 10 + headerH + rows.reduce((a, b) => a + b, 0);
}

function table(l: Layout, t: Table): void {
  const widths = columnWidths(l, t);
  const label = l.captions.get(t.id) ?? 'Table';
  const headers = t.columns.map((c) => c.header);
  const headerH = rowHeight(l, headers, widths, true);
  const captionRuns = [plain(`${label}. `, 'bold'), plain(t.caption)];
  const captionH = measureRuns(l, captionRuns, l.width, { size: BODY_SIZE - 0.5 });
  const heights = t.rows.map((row, r) => rowHeight(l, rowTexts(l, t, r), widths, row.emphasis === 'total'));
  const bodyH = heights.reduce((a, b) => a + b, 0);
  const whole = captionH + 5 + headerH + bodyH;
  const pageH = l.pdf.page.height - MARGIN.top - MARGIN.bottom;
  // A table that fits on one page is kept whole; a longer one starts where it is, with room for
  // its caption, header and first row.
  ensure(l, whole <= pageH ? whole : captionH + 5 + headerH + (heights[0] ?? 0));
  l.pdf.y += 2;
  group(l, 'Table', () => tableBody(l, t, { widths, headers, headerH, heights, captionRuns, label }));
  const notes: Inline[][] = [...(t.notes ?? []), ...tableLegend(t, l.doc.suppression).map((s) => [plain(s)])];
  for (const n of notes) {
    ensure(l, 14);
    tag(l, 'P', () => writeRuns(l, l.pdf, n, l.left, l.pdf.y, l.width, { size: BODY_SIZE - 1.5, color: MUTED }));
    l.pdf.y += 1.5;
  }
  l.pdf.y += PARA_GAP + 4;
}

function tableBody(l: Layout, t: Table, m: { widths: number[]; headers: string[]; headerH: number; heights: number[]; captionRuns: Inline[]; label: string }): void {
  const { widths, headers, headerH, heights, captionRuns, label } = m;
  tag(l, 'Caption', () => writeRuns(l, l.pdf, captionRuns, l.left, l.pdf.y, l.width, { size: BODY_SIZE - 0.5 }));
  l.pdf.y += 3;
  let y = l.pdf.y;
  group(l, 'THead', () => drawRow(l, t, headers, widths, y, headerH, 'header'));
  y += headerH;
  group(l, 'TBody', () => t.rows.forEach((row, r) => {
    const texts = rowTexts(l, t, r);
    const total = row.emphasis === 'total';
    const h = heights[r]!;
    // Widow control: the last rows (the total among them) move together rather than alone.
    const tail = t.rows.length - r <= KEEP_LAST_ROWS ? heights.slice(r).reduce((a, b) => a + b, 0) : h;
    const tailFits = tail <= bottom(l) - MARGIN.top - headerH - 20;
    if (y + (tailFits ? tail : h) > bottom(l)) {
      newPage(l);
      // Continued tables repeat their caption label and header row (artifacts: read once).
      artifact(l, () => writeRuns(l, l.pdf, [plain(`${label} (continued). `, 'bold'), plain(t.caption, 'italic')], l.left, l.pdf.y, l.width, { size: BODY_SIZE - 1.5, color: MUTED }), 'Pagination');
      l.pdf.y += 3;
      y = l.pdf.y;
      drawRow(l, t, headers, widths, y, headerH, 'header', true);
      y += headerH;
    }
    drawRow(l, t, texts, widths, y, h, total ? 'total' : 'body');
    y += h;
  }));
  l.pdf.y = y + 4;
}

/** Figures take at most this share of the page's text height, so two fit on a page with their captions. */
const FIGURE_SHARE = 0.36;

function figureSize(l: Layout, pw: number, ph: number): { w: number; h: number } {
  let w = l.width * 0.92;
  let h = (w * ph) / pw;
  const maxH = (l.pdf.page.height - MARGIN.top - MARGIN.bottom) * FIGURE_SHARE;
  if (h > maxH) { h = maxH; w = (h * pw) / ph; }
  return { w, h };
}

function figureHeight(l: Layout, f: Figure): number {
  const png = l.pngs.get(f.id);
  if (!png) return 0;
  const { width: pw, height: ph } = pngSize(png);
  const captionH = measureRuns(l, [plain(`${l.captions.get(f.id) ?? 'Figure'}. `, 'bold'), plain(f.caption)], l.width, { size: BODY_SIZE - 0.5 });
  return figureSize(l, pw, ph).h + captionH + 12;
}

function figure(l: Layout, f: Figure): void {
  const png = l.pngs.get(f.id);
  const label = l.captions.get(f.id) ?? 'Figure';
  const captionRuns = [plain(`${label}. `, 'bold'), plain(f.caption)];
  const captionH = measureRuns(l, captionRuns, l.width, { size: BODY_SIZE - 0.5 });
  if (!png) return;
  const { width: pw, height: ph } = pngSize(png);
  const { w, h } = figureSize(l, pw, ph);
  ensure(l, h + captionH + 12);
  const y = l.pdf.y + 4;
  tag(l, 'Figure', () => { l.pdf.image(png, l.left + (l.width - w) / 2, y, { width: w, height: h }); }, { alt: f.alt });
  l.pdf.y = y + h + 4;
  tag(l, 'Caption', () => writeRuns(l, l.pdf, captionRuns, l.left, l.pdf.y, l.width, { size: BODY_SIZE - 0.5 }));
  l.pdf.y += PARA_GAP + 6;
}

function glossary(l: Layout, entries: Array<{ term: string; definition: Inline[] }>): void {
  group(l, 'L', () => {
    for (const e of entries) {
      ensure(l, BODY_SIZE * 4);
      group(l, 'LI', () => {
        tag(l, 'Lbl', () => { l.pdf.font('bold').fontSize(BODY_SIZE).fillColor(INK).text(e.term, l.left, l.pdf.y, { width: l.width }); });
        l.pdf.y += 1;
        tag(l, 'LBody', () => writeRuns(l, l.pdf, e.definition, l.left + 16, l.pdf.y, l.width - 16, { size: BODY_SIZE }));
      });
      l.pdf.y += PARA_GAP;
    }
  });
}

function block(l: Layout, b: Block): void {
  switch (b.kind) {
    case 'paragraph': paragraph(l, b); break;
    case 'list': list(l, b); break;
    case 'keyFinding':
      box(l, [{ kind: 'title', text: b.title }, ...b.body], { fill: '#eaf3fb', edge: '#0072b2', leftBarOnly: false });
      break;
    case 'note': note(l, b); break;
    case 'glossary': glossary(l, b.entries); break;
    case 'table': table(l, b); break;
    case 'figure': figure(l, b); break;
    case 'pageBreak': if (!atTop(l)) newPage(l); break;
  }
}

/** The least of a block that must stand under a heading: a whole small table or figure, a table's
 *  caption, header and first rows, a box, or two lines of text. */
function leadHeight(l: Layout, b: Block | undefined): number {
  if (!b) return 0;
  switch (b.kind) {
    case 'figure': return figureHeight(l, b);
    case 'table': return tableLeadHeight(l, b);
    case 'keyFinding': return boxHeight(l, [{ kind: 'title', text: b.title }, ...b.body], l.width - 20) + 28;
    case 'note': return Math.min(220, boxHeight(l, [{ kind: 'title', text: b.title ?? '' }, ...b.body], l.width - 24) + 28);
    case 'paragraph': return Math.min(measureRuns(l, b.runs, l.width, { size: BODY_SIZE }), BODY_SIZE * 3.2) + PARA_GAP;
    case 'list': {
      // A short list is kept whole (see list()), so the heading must keep with all of it.
      const whole = b.items.reduce((h, item) => h + measureRuns(l, item, l.width - 20, { size: BODY_SIZE }) + 2, 0);
      return whole < (l.pdf.page.height - MARGIN.top - MARGIN.bottom) / 3 ? whole : BODY_SIZE * 3.2;
    }
    default: return BODY_SIZE * 3.2;
  }
}

/** What must follow a section's heading on the same page: its first block, or its first sub-section's heading and first block. */
function keepWithHeight(l: Layout, s: Section, level: 1 | 2 | 3): number {
  if (s.blocks.length) {
    const first = leadHeight(l, s.blocks[0]);
    // A short lead paragraph is kept together with the block after it (a table or figure it introduces).
    return s.blocks[0]!.kind === 'paragraph' && s.blocks[1] && s.blocks[1].kind !== 'paragraph' ? first + leadHeight(l, s.blocks[1]) : first;
  }
  const sub = s.sections?.[0];
  if (!sub) return 0;
  const subLevel = Math.min(3, level + 1) as 1 | 2 | 3;
  return headingHeight(l, sub.heading, subLevel) + keepWithHeight(l, sub, subLevel);
}

/** Does the paragraph end in a colon, announcing the block after it? */
function introduces(b: Extract<Block, { kind: 'paragraph' }>): boolean {
  const last = [...b.runs].reverse().find((r) => r.kind === 'text');
  return !!last && last.kind === 'text' && /:\s*$/.test(last.text);
}

function section(l: Layout, s: Section, level: 1 | 2 | 3): void {
  if (s.pageBreakBefore && !atTop(l)) newPage(l);
  const pageH = l.pdf.page.height - MARGIN.top - MARGIN.bottom;
  group(l, 'Sect', () => {
    heading(l, s.heading, level, Math.min(keepWithHeight(l, s, level), pageH * 0.8));
    s.blocks.forEach((b, i) => {
      // A paragraph that introduces what follows ("Notes from reading the file:") is not left
      // alone at the foot of a page: it moves with the start of the next block.
      const next = s.blocks[i + 1];
      if (b.kind === 'paragraph' && next && introduces(b)) ensure(l, Math.min(leadHeight(l, b) + leadHeight(l, next), pageH * 0.8));
      block(l, b);
    });
    for (const c of s.sections ?? []) section(l, c, Math.min(3, level + 1) as 1 | 2 | 3);
  });
}

function titleBlock(l: Layout): void {
  const tb = l.doc.title;
  const pdf = l.pdf;
  tag(l, 'H1', () => { pdf.font('bold').fontSize(20).fillColor(INK).text(tb.title, l.left, MARGIN.top, { width: l.width, lineGap: 2 }); });
  pdf.y += 4;
  if (tb.subtitle) {
    tag(l, 'P', () => { pdf.font('regular').fontSize(12).fillColor(MUTED).text(tb.subtitle!, l.left, pdf.y, { width: l.width }); });
    pdf.y += 6;
  }
  tag(l, 'P', () => { pdf.font('bold').fontSize(10).fillColor(INK).text(tb.dateLine, l.left, pdf.y, { width: l.width }); });
  pdf.y += 4;
  for (const line of tb.provenance) {
    tag(l, 'P', () => { pdf.font('cond').fontSize(8).fillColor(MUTED).text(line, l.left, pdf.y, { width: l.width }); });
  }
  const y = pdf.y + 6;
  artifact(l, () => pdf.moveTo(l.left, y).lineTo(l.left + l.width, y).lineWidth(1.5).strokeColor(INK).stroke(), 'Layout');
  pdf.y = y + 14;
}

function endNotes(l: Layout): void {
  const notes = numberedFootnotes(l.doc);
  if (!notes.length) return;
  heading(l, 'Notes', 1);
  for (const n of notes) {
    ensure(l, 24);
    const y = l.pdf.y;
    tag(l, 'Note', () => {
      l.pdf.font('regular').fontSize(BODY_SIZE - 1).fillColor(INK).text(`${n.number}.`, l.left, y, { width: 18, lineBreak: false });
      writeRuns(l, l.pdf, n.body, l.left + 20, y, l.width - 20, { size: BODY_SIZE - 1 });
    });
    l.pdf.y += 3;
  }
}

function footers(l: Layout): void {
  const pdf = l.pdf;
  const range = pdf.bufferedPageRange();
  const title = l.doc.title.title;
  for (let i = range.start; i < range.start + range.count; i++) {
    pdf.switchToPage(i);
    // Writing inside the bottom margin must not start a new page.
    const saved = pdf.page.margins.bottom;
    pdf.page.margins.bottom = 0;
    const y = pdf.page.height - MARGIN.bottom + 24;
    artifact(l, () => {
      pdf.moveTo(l.left, y - 6).lineTo(l.left + l.width, y - 6).lineWidth(0.4).strokeColor(RULE).stroke();
      pdf.font('cond').fontSize(8).fillColor(MUTED);
      pdf.text(title, l.left, y, { width: l.width * 0.7, lineBreak: false, ellipsis: true, height: 10 });
      pdf.text(`Page ${i - range.start + 1} of ${range.count}`, l.left, y, { width: l.width, align: 'right', lineBreak: false });
    }, 'Pagination');
    pdf.page.margins.bottom = saved;
  }
}

export async function renderPdf(doc: Document, opts: PdfOptions = {}): Promise<Buffer> {
  assertRenderable(doc);
  const created = new Date(doc.title.createdAt);
  if (Number.isNaN(created.getTime())) throw new Error(`The memo's creation date "${doc.title.createdAt}" is not an ISO date.`);
  const pngs = await figurePngs(doc, opts);
  const size = opts.pageSize ?? 'LETTER';
  const pdf = new PDFDocument({
    size,
    margins: MARGIN,
    bufferPages: true,
    autoFirstPage: true,
    pdfVersion: '1.7',
    tagged: true,
    lang: doc.title.language ?? 'en',
    displayTitle: true,
    info: {
      Title: doc.title.title,
      Author: doc.title.author ?? 'Fenceline',
      Subject: doc.title.subtitle ?? '',
      Creator: 'Fenceline',
      Producer: 'Fenceline (pdfkit)',
      CreationDate: created,
      ModDate: created,
    },
  });
  const scratch = new PDFDocument({ size: [612, 100000], margins: { top: 0, bottom: 0, left: 0, right: 0 }, info: { CreationDate: created } });
  registerFonts(pdf);
  registerFonts(scratch);
  const chunks: Buffer[] = [];
  pdf.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    pdf.on('end', () => resolve(Buffer.concat(chunks)));
    pdf.on('error', reject);
  });
  const root = pdf.struct('Document');
  pdf.addStructure(root);
  const l: Layout = {
    pdf, scratch, doc, parent: root,
    fn: footnoteNumbers(doc), captions: captionNumbers(doc), pngs,
    left: MARGIN.left, width: pdf.page.width - MARGIN.left - MARGIN.right,
  };
  titleBlock(l);
  for (const s of doc.sections) section(l, s, 1);
  endNotes(l);
  root.end();
  footers(l);
  pdf.end();
  scratch.end();
  return done;
}
