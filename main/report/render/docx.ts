// Document → Word (.docx) with the docx library: real Heading 1–3 styles (so Word's navigation pane
// and a table of contents work), real tables with repeating header rows that a reviewer can edit,
// real footnotes, images with alt text, and "Page X of Y" in the footer. Creation dates in the
// package come from the document, and ZIP entry times are fixed (zip-dates.ts), so the same document
// gives the same bytes.

import {
  AlignmentType, BorderStyle, Document as DocxDocument, Footer, FootnoteReferenceRun, HeadingLevel, ImageRun,
  LevelFormat, Packer, PageBreak, PageNumber, Paragraph, ShadingType, Table as DocxTable, TableCell, TableRow,
  TextRun, WidthType,
} from 'docx';
import type { Block, BulletList, Document, Figure, Inline, Note, Paragraph as DocParagraph, Section, Table } from '../model/document.ts';
import {
  NOTE_TONE_LABEL, assertRenderable, captionNumbers, cellText, footnoteNumbers, inlineText, numberedFootnotes,
  tableLegend,
} from '../model/format.ts';
import { figurePngs, pngSize } from './figures.ts';
import type { RenderOptions } from './options.ts';
import { escapeHtml as escapeXml } from './html.ts';
import { setZipEntryDates } from './zip-dates.ts';

type Child = Paragraph | DocxTable;

interface Ctx {
  doc: Document;
  fn: Map<string, number>;
  captions: Map<string, string>;
  pngs: Map<string, Buffer>;
  orderedLists: number;
  /** Drawing ids (wp:docPr) numbered per document; the library's own counter runs across documents. */
  drawings: number;
}

const FONT = 'Arial';
const BODY = 20; // half-points: 10 pt
const SMALL = 17;
/** Text width of a Letter page with 1-inch margins, in pixels at 96 per inch (docx image units). */
const TEXT_WIDTH_PX = 624;

function runsOf(ctx: Ctx, list: readonly Inline[], size = BODY, color?: string): Array<TextRun | FootnoteReferenceRun> {
  const out: Array<TextRun | FootnoteReferenceRun> = [];
  for (const r of list) {
    const text = inlineText(r, ctx.doc.suppression);
    const style = r.style ?? 'plain';
    out.push(new TextRun({
      text,
      bold: style === 'bold' || style === 'boldItalic',
      italics: style === 'italic' || style === 'boldItalic',
      size,
      ...(color ? { color } : {}),
    }));
    const n = r.footnote ? ctx.fn.get(r.footnote) : undefined;
    if (n !== undefined) out.push(new FootnoteReferenceRun(n));
  }
  return out;
}

function para(ctx: Ctx, p: DocParagraph, extra: Record<string, unknown> = {}): Paragraph {
  return new Paragraph({ children: runsOf(ctx, p.runs), spacing: { after: 120 }, ...extra });
}

function list(ctx: Ctx, b: BulletList): Paragraph[] {
  const instance = b.ordered ? ++ctx.orderedLists : 0;
  return b.items.map((item) => new Paragraph({
    children: runsOf(ctx, item),
    numbering: b.ordered ? { reference: 'ordered', level: 0, instance } : { reference: 'bullets', level: 0 },
    spacing: { after: 60 },
  }));
}

/** A one-cell table: the key finding and the notes are boxes a reviewer can still edit. */
function boxTable(children: Paragraph[], fill: string, edge: string, leftOnly: boolean): DocxTable {
  const line = { style: BorderStyle.SINGLE, size: leftOnly ? 4 : 12, color: leftOnly ? fill : edge };
  const bar = { style: BorderStyle.SINGLE, size: 36, color: edge };
  return new DocxTable({
    width: { size: 100, type: WidthType.PERCENTAGE },
    rows: [new TableRow({
      cantSplit: true,
      children: [new TableCell({
        children,
        shading: { type: ShadingType.CLEAR, color: 'auto', fill },
        margins: { top: 120, bottom: 80, left: 160, right: 160 },
        borders: { top: line, bottom: line, right: line, left: leftOnly ? bar : line },
      })],
    })],
  });
}

function note(ctx: Ctx, n: Note): Child[] {
  const label = NOTE_TONE_LABEL[n.tone];
  const title = n.title ? `${label}: ${n.title}` : label;
  const fill = n.tone === 'caution' ? 'FFF4E0' : 'F2F2F2';
  const edge = n.tone === 'caution' ? 'B35C00' : '555555';
  return [
    boxTable([
      new Paragraph({ children: [new TextRun({ text: title, bold: true, size: BODY })], spacing: { after: 80 } }),
      ...n.body.map((p) => para(ctx, p)),
    ], fill, edge, true),
    new Paragraph({ children: [], spacing: { after: 80 } }),
  ];
}

function caption(label: string, text: string, keepNext: boolean): Paragraph {
  return new Paragraph({
    keepNext,
    spacing: { before: 160, after: 80 },
    children: [new TextRun({ text: `${label}. `, bold: true, size: BODY - 1 }), new TextRun({ text, size: BODY - 1 })],
  });
}

const ALIGN = { left: AlignmentType.LEFT, right: AlignmentType.RIGHT, center: AlignmentType.CENTER } as const;

function table(ctx: Ctx, t: Table): Child[] {
  const label = ctx.captions.get(t.id) ?? 'Table';
  const weights = t.columns.map((c) => c.width ?? 1);
  const wsum = weights.reduce((a, b) => a + b, 0);
  const total = 9360; // twips: 6.5 in
  const columnWidths = weights.map((w) => Math.round((w / wsum) * total));
  const thin = { style: BorderStyle.SINGLE, size: 2, color: 'D6D6D6' };
  const none = { style: BorderStyle.NONE, size: 0, color: 'FFFFFF' };
  const header = new TableRow({
    tableHeader: true, // Word repeats this row at the top of each page the table runs onto
    cantSplit: true,
    children: t.columns.map((c, i) => new TableCell({
      width: { size: columnWidths[i]!, type: WidthType.DXA },
      shading: { type: ShadingType.CLEAR, color: 'auto', fill: 'ECECEC' },
      margins: { top: 40, bottom: 40, left: 80, right: 80 },
      borders: { top: none, left: none, right: none, bottom: { style: BorderStyle.SINGLE, size: 8, color: '1A1A1A' } },
      children: [new Paragraph({ alignment: ALIGN[c.align], children: [new TextRun({ text: c.header, bold: true, size: SMALL })] })],
    })),
  });
  const rows = t.rows.map((row) => new TableRow({
    cantSplit: true,
    children: row.cells.map((cell, i) => {
      const col = t.columns[i]!;
      const text = cellText(cell, col, ctx.doc.suppression);
      const runs: Array<TextRun | FootnoteReferenceRun> = [new TextRun({ text, bold: row.emphasis === 'total', size: SMALL })];
      const n = (cell.kind === 'text' || cell.kind === 'number') && cell.footnote ? ctx.fn.get(cell.footnote) : undefined;
      if (n !== undefined) runs.push(new FootnoteReferenceRun(n));
      return new TableCell({
        width: { size: columnWidths[i]!, type: WidthType.DXA },
        margins: { top: 30, bottom: 30, left: 80, right: 80 },
        borders: {
          left: none, right: none, bottom: thin,
          top: row.emphasis === 'total' ? { style: BorderStyle.SINGLE, size: 8, color: '1A1A1A' } : none,
        },
        children: [new Paragraph({ alignment: ALIGN[col.align], children: runs })],
      });
    }),
  }));
  const notes = [
    ...(t.notes ?? []).map((n) => new Paragraph({ children: runsOf(ctx, n, SMALL, '555555'), spacing: { after: 20 } })),
    ...tableLegend(t, ctx.doc.suppression).map((s) => new Paragraph({ children: [new TextRun({ text: s, size: SMALL, color: '555555' })], spacing: { after: 20 } })),
  ];
  return [
    caption(label, t.caption, true),
    new DocxTable({ width: { size: 100, type: WidthType.PERCENTAGE }, columnWidths, rows: [header, ...rows] }),
    ...notes,
    new Paragraph({ children: [], spacing: { after: 120 } }),
  ];
}

function figure(ctx: Ctx, f: Figure): Child[] {
  const png = ctx.pngs.get(f.id);
  if (!png) return [];
  const { width, height } = pngSize(png);
  const w = TEXT_WIDTH_PX;
  const h = Math.round((w * height) / width);
  return [
    new Paragraph({
      keepNext: true,
      alignment: AlignmentType.CENTER,
      children: [new ImageRun({
        type: 'png', data: png, transformation: { width: w, height: h },
        altText: { id: String(++ctx.drawings), name: f.id, title: f.caption, description: f.alt },
      })],
    }),
    caption(ctx.captions.get(f.id) ?? 'Figure', f.caption, false),
  ];
}

function block(ctx: Ctx, b: Block): Child[] {
  switch (b.kind) {
    case 'paragraph': return [para(ctx, b)];
    case 'list': return list(ctx, b);
    case 'keyFinding': {
      const inner: Paragraph[] = [new Paragraph({ children: [new TextRun({ text: b.title, bold: true, size: BODY + 2 })], spacing: { after: 100 } })];
      for (const x of b.body) inner.push(...(x.kind === 'paragraph' ? [para(ctx, x)] : list(ctx, x)));
      return [boxTable(inner, 'EAF3FB', '0072B2', false), new Paragraph({ children: [], spacing: { after: 120 } })];
    }
    case 'note': return note(ctx, b);
    case 'glossary':
      return b.entries.flatMap((e) => [
        new Paragraph({ keepNext: true, spacing: { before: 100 }, children: [new TextRun({ text: e.term, bold: true, size: BODY })] }),
        new Paragraph({ indent: { left: 360 }, spacing: { after: 80 }, children: runsOf(ctx, e.definition) }),
      ]);
    case 'table': return table(ctx, b);
    case 'figure': return figure(ctx, b);
    case 'pageBreak': return [new Paragraph({ children: [new PageBreak()] })];
  }
}

const HEADING = [HeadingLevel.HEADING_1, HeadingLevel.HEADING_2, HeadingLevel.HEADING_3] as const;

function section(ctx: Ctx, s: Section, level: 1 | 2 | 3): Child[] {
  return [
    new Paragraph({ heading: HEADING[level - 1], text: s.heading, pageBreakBefore: s.pageBreakBefore === true }),
    ...s.blocks.flatMap((b) => block(ctx, b)),
    ...(s.sections ?? []).flatMap((c) => section(ctx, c, Math.min(3, level + 1) as 1 | 2 | 3)),
  ];
}

/** docProps/core.xml (ECMA-376 Part 2, §11: core properties) with the document's own dates. */
function coreXml(doc: Document): string {
  const tb = doc.title;
  const when = new Date(tb.createdAt).toISOString().replace(/\.\d{3}Z$/, 'Z');
  return '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    + '<cp:coreProperties xmlns:cp="http://schemas.openxmlformats.org/package/2006/metadata/core-properties" '
    + 'xmlns:dc="http://purl.org/dc/elements/1.1/" xmlns:dcterms="http://purl.org/dc/terms/" '
    + 'xmlns:dcmitype="http://purl.org/dc/dcmitype/" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance">'
    + `<dc:title>${escapeXml(tb.title)}</dc:title>`
    + (tb.subtitle ? `<dc:subject>${escapeXml(tb.subtitle)}</dc:subject>` : '')
    + `<dc:creator>${escapeXml(tb.author ?? 'Fenceline')}</dc:creator>`
    + `<dc:language>${escapeXml(tb.language ?? 'en')}</dc:language>`
    + `<cp:lastModifiedBy>${escapeXml(tb.author ?? 'Fenceline')}</cp:lastModifiedBy>`
    + '<cp:revision>1</cp:revision>'
    + `<dcterms:created xsi:type="dcterms:W3CDTF">${when}</dcterms:created>`
    + `<dcterms:modified xsi:type="dcterms:W3CDTF">${when}</dcterms:modified>`
    + '</cp:coreProperties>';
}

export async function renderDocx(doc: Document, opts: RenderOptions = {}): Promise<Buffer> {
  assertRenderable(doc);
  const ctx: Ctx = { doc, fn: footnoteNumbers(doc), captions: captionNumbers(doc), pngs: await figurePngs(doc, opts), orderedLists: 0, drawings: 0 };
  const tb = doc.title;
  const footnotes: Record<number, { children: Paragraph[] }> = {};
  for (const n of numberedFootnotes(doc)) footnotes[n.number] = { children: [new Paragraph({ children: runsOf(ctx, n.body, SMALL) })] };

  const titleBlock: Paragraph[] = [
    new Paragraph({ heading: HeadingLevel.TITLE, text: tb.title }),
    ...(tb.subtitle ? [new Paragraph({ children: [new TextRun({ text: tb.subtitle, size: 26, color: '555555' })], spacing: { after: 120 } })] : []),
    new Paragraph({ children: [new TextRun({ text: tb.dateLine, bold: true, size: BODY })], spacing: { after: 80 } }),
    ...tb.provenance.map((line, i) => new Paragraph({
      children: [new TextRun({ text: line, size: 16, color: '555555' })],
      ...(i === tb.provenance.length - 1 ? { border: { bottom: { style: BorderStyle.SINGLE, size: 12, color: '1A1A1A', space: 6 } }, spacing: { after: 240 } } : {}),
    })),
  ];
  const body: Child[] = [...titleBlock, ...doc.sections.flatMap((s) => section(ctx, s, 1))];

  const file = new DocxDocument({
    creator: tb.author ?? 'Fenceline',
    title: tb.title,
    ...(tb.subtitle ? { subject: tb.subtitle } : {}),
    styles: {
      default: {
        document: { run: { font: FONT, size: BODY, color: '1A1A1A' }, paragraph: { spacing: { line: 276 } } },
        title: { run: { font: FONT, size: 40, bold: true, color: '1A1A1A' }, paragraph: { spacing: { after: 120 } } },
        heading1: { run: { font: FONT, size: 30, bold: true, color: '1A1A1A' }, paragraph: { spacing: { before: 360, after: 120 }, keepNext: true, keepLines: true } },
        heading2: { run: { font: FONT, size: 25, bold: true, color: '1A1A1A' }, paragraph: { spacing: { before: 240, after: 100 }, keepNext: true, keepLines: true } },
        heading3: { run: { font: FONT, size: 22, bold: true, color: '1A1A1A' }, paragraph: { spacing: { before: 200, after: 80 }, keepNext: true, keepLines: true } },
      },
    },
    numbering: {
      config: [
        { reference: 'bullets', levels: [{ level: 0, format: LevelFormat.BULLET, text: '•', alignment: AlignmentType.LEFT, style: { paragraph: { indent: { left: 540, hanging: 270 } } } }] },
        { reference: 'ordered', levels: [{ level: 0, format: LevelFormat.DECIMAL, text: '%1.', alignment: AlignmentType.LEFT, style: { paragraph: { indent: { left: 540, hanging: 360 } } } }] },
      ],
    },
    footnotes,
    sections: [{
      properties: {
        page: { size: { width: 12240, height: 15840 }, margin: { top: 1440, bottom: 1440, left: 1440, right: 1440 } },
      },
      footers: {
        default: new Footer({
          children: [new Paragraph({
            alignment: AlignmentType.RIGHT,
            children: [new TextRun({ children: ['Page ', PageNumber.CURRENT, ' of ', PageNumber.TOTAL_PAGES], size: 16, color: '555555' })],
          })],
        }),
      },
      children: body,
    }],
  });
  const packed = await Packer.toBuffer(file, false, [{ path: 'docProps/core.xml', data: coreXml(doc) }]);
  return setZipEntryDates(packed, tb.createdAt);
}
