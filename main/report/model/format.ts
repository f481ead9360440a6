// Text of numbers, cells and runs, shared by every renderer so that the PDF, the Word file, the web
// page and the workbook print the same characters for the same value.
// Negative numbers use the ASCII hyphen-minus so that text extracted from any format parses back
// with Number() (a test compares memo text with results.json).

import type { Cell, Document, Inline, NumberFormat, Section, SuppressionLegend, Table, TableColumn } from './document.ts';

function groupThousands(digits: string): string {
  return digits.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

function fixed(value: number, decimals: number): string {
  const s = Math.abs(value).toFixed(decimals);
  const [int, frac] = s.split('.');
  const body = groupThousands(int!) + (frac !== undefined ? '.' + frac : '');
  // -0.004 at two decimals prints as 0.00: a rounded zero has no sign.
  return (value < 0 && Number(s) !== 0 ? '-' : '') + body;
}

/** The text of a number in a given format, e.g. formatNumber(-35.2, { style: 'decimal', decimals: 1 }) = "-35.2". */
export function formatNumber(value: number, format: NumberFormat): string {
  if (Number.isNaN(value)) return 'not available';
  if (!Number.isFinite(value)) return value > 0 ? 'unbounded' : '-unbounded';
  let text: string;
  switch (format.style) {
    case 'integer': text = fixed(Math.round(value), 0); break;
    case 'decimal': text = fixed(value, format.decimals ?? 2); break;
    case 'percent': text = fixed(value * 100, format.decimals ?? 1) + '%'; break;
    case 'pvalue': {
      const d = format.decimals ?? 3;
      const floor = Math.pow(10, -d);
      text = value < floor ? `< ${floor.toFixed(d)}` : fixed(value, d);
      break;
    }
  }
  if (format.signed && value > 0 && /[1-9]/.test(text)) text = '+' + text;
  return format.unit ? `${text} ${format.unit}` : text;
}

/** The matching spreadsheet number format (Excel / ECMA-376 Part 1, §18.8.31 numFmt codes). */
export function excelNumberFormat(format: NumberFormat): string {
  const dec = (n: number) => (n > 0 ? '.' + '0'.repeat(n) : '');
  let code: string;
  switch (format.style) {
    case 'integer': code = '#,##0'; break;
    case 'decimal': code = '#,##0' + dec(format.decimals ?? 2); break;
    case 'percent': code = '0' + dec(format.decimals ?? 1) + '%'; break;
    case 'pvalue': code = '0' + dec(format.decimals ?? 3); break;
  }
  if (format.unit) code += `" ${format.unit.replace(/"/g, '')}"`;
  if (format.signed) code = `+${code};-${code};${code}`;
  return code;
}

export const DEFAULT_NUMBER_FORMAT: NumberFormat = { style: 'decimal', decimals: 2 };

export function suppressedText(reason: 'small' | 'derived', legend: SuppressionLegend): string {
  return reason === 'small' ? legend.smallMark : legend.derivedMark;
}

/** The printed text of a table cell (without any footnote mark). */
export function cellText(cell: Cell, column: TableColumn, legend: SuppressionLegend): string {
  switch (cell.kind) {
    case 'text': return cell.text;
    case 'number': return formatNumber(cell.value, cell.format ?? column.format ?? DEFAULT_NUMBER_FORMAT);
    case 'suppressed': return suppressedText(cell.reason, legend);
    case 'empty': return '';
  }
}

/** The printed text of an inline run (without any footnote mark). */
export function inlineText(run: Inline, legend: SuppressionLegend): string {
  switch (run.kind) {
    case 'text': return run.text;
    case 'number': return formatNumber(run.value, run.format);
    case 'suppressed': return suppressedText(run.reason, legend);
  }
}

export function runsText(runs: readonly Inline[], legend: SuppressionLegend): string {
  return runs.map((r) => inlineText(r, legend)).join('');
}

/** Sections in reading order with their level (1–3). */
export function flattenSections(doc: Document): Array<{ section: Section; level: 1 | 2 | 3 }> {
  const out: Array<{ section: Section; level: 1 | 2 | 3 }> = [];
  const visit = (s: Section, depth: number) => {
    out.push({ section: s, level: Math.min(3, depth) as 1 | 2 | 3 });
    for (const c of s.sections ?? []) visit(c, depth + 1);
  };
  for (const s of doc.sections) visit(s, 1);
  return out;
}

export function tables(doc: Document): Table[] {
  return flattenSections(doc).flatMap(({ section }) => section.blocks.filter((b): b is Table => b.kind === 'table'));
}

function inlinesOf(doc: Document): Inline[] {
  const out: Inline[] = [];
  for (const { section } of flattenSections(doc)) {
    for (const b of section.blocks) {
      switch (b.kind) {
        case 'paragraph': out.push(...b.runs); break;
        case 'keyFinding':
          for (const x of b.body) {
            if (x.kind === 'paragraph') out.push(...x.runs); else out.push(...x.items.flat());
          }
          break;
        case 'list': out.push(...b.items.flat()); break;
        case 'note': for (const p of b.body) out.push(...p.runs); break;
        case 'glossary': for (const e of b.entries) out.push(...e.definition); break;
        case 'table':
          for (const row of b.rows) {
            for (const c of row.cells) {
              if ((c.kind === 'text' || c.kind === 'number') && c.footnote) out.push({ kind: 'text', text: '', footnote: c.footnote });
            }
          }
          for (const n of b.notes ?? []) out.push(...n);
          break;
        default: break;
      }
    }
  }
  return out;
}

/** Footnote numbers (1, 2, …) in order of first reference; unreferenced footnotes get none. */
export function footnoteNumbers(doc: Document): Map<string, number> {
  const numbers = new Map<string, number>();
  for (const run of inlinesOf(doc)) {
    if (run.footnote && !numbers.has(run.footnote)) numbers.set(run.footnote, numbers.size + 1);
  }
  return numbers;
}

/** Footnotes in printed order with their numbers. */
export function numberedFootnotes(doc: Document): Array<{ number: number; id: string; body: Inline[] }> {
  const numbers = footnoteNumbers(doc);
  return doc.footnotes
    .filter((f) => numbers.has(f.id))
    .map((f) => ({ number: numbers.get(f.id)!, id: f.id, body: f.body }))
    .sort((a, b) => a.number - b.number);
}

export function tableHasSuppressed(table: Table): boolean {
  return table.rows.some((r) => r.cells.some((c) => c.kind === 'suppressed'));
}

/** The legend lines a table prints under itself (only the reasons it uses). */
export function tableLegend(table: Table, legend: SuppressionLegend): string[] {
  const reasons = new Set<string>();
  for (const r of table.rows) for (const c of r.cells) if (c.kind === 'suppressed') reasons.add(c.reason);
  const out: string[] = [];
  if (reasons.has('small') && legend.smallLegend) out.push(legend.smallLegend);
  if (reasons.has('derived') && legend.derivedLegend) out.push(legend.derivedLegend);
  return out;
}

/**
 * Problems that would make a renderer misprint the document: duplicate ids, sections deeper than 3,
 * rows with the wrong number of cells, footnote references to footnotes that do not exist. The memo
 * model builds documents, so a problem here is an internal fault; renderers throw with the list.
 */
export function checkDocument(doc: Document): string[] {
  const problems: string[] = [];
  const ids = new Set<string>();
  const addId = (id: string, what: string) => {
    if (ids.has(id)) problems.push(`${what} id "${id}" is used twice`);
    ids.add(id);
  };
  const visit = (s: Section, depth: number, path: string) => {
    if (depth > 3) problems.push(`section "${path}" is nested deeper than 3 levels`);
    addId(s.id, 'section');
    for (const b of s.blocks) {
      if (b.kind === 'table') {
        addId(b.id, 'table');
        b.rows.forEach((r, i) => {
          if (r.cells.length !== b.columns.length) {
            problems.push(`table "${b.id}" row ${i + 1} has ${r.cells.length} cells for ${b.columns.length} columns`);
          }
        });
      } else if (b.kind === 'figure') {
        addId(b.id, 'figure');
      }
    }
    for (const c of s.sections ?? []) visit(c, depth + 1, `${path} › ${c.heading}`);
  };
  for (const s of doc.sections) visit(s, 1, s.heading);
  const known = new Set(doc.footnotes.map((f) => f.id));
  for (const run of inlinesOf(doc)) {
    if (run.footnote && !known.has(run.footnote)) problems.push(`footnote "${run.footnote}" is referenced but not defined`);
  }
  return problems;
}

export function assertRenderable(doc: Document): void {
  const problems = checkDocument(doc);
  if (problems.length) throw new Error('The memo document is malformed:\n  - ' + problems.join('\n  - '));
}

/** "Table 1", "Figure 1", … numbered separately in reading order. */
export function captionNumbers(doc: Document): Map<string, string> {
  const out = new Map<string, string>();
  let t = 0;
  let f = 0;
  for (const { section } of flattenSections(doc)) {
    for (const b of section.blocks) {
      if (b.kind === 'table') out.set(b.id, `Table ${++t}`);
      else if (b.kind === 'figure') out.set(b.id, `Figure ${++f}`);
    }
  }
  return out;
}

/** Footnote mark as Unicode superscript digits (formats without a superscript style: PDF). */
export function superscriptDigits(n: number): string {
  const sup = '⁰¹²³⁴⁵⁶⁷⁸⁹';
  return String(n).split('').map((d) => sup[Number(d)]!).join('');
}

export const NOTE_TONE_LABEL = { caution: 'Caution', limitation: 'Limitation', info: 'Note' } as const;
