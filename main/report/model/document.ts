// The memo as a document tree: what the memo says, with no layout in it.
// The memo model (results → Document) builds it with pure functions; the four renderers
// (main/report/render: pdf, docx, html, xlsx) only lay it out. Everything here is plain,
// JSON-serializable data (no class instances, no functions, no Dates: dates are ISO strings),
// so a document can be written to disk, compared in a test, or sent to the renderer process.

import type { ChartSpec } from '../charts/spec.ts';

/** Format version of this tree; bump when a change would make an older renderer misread it. */
export const DOCUMENT_FORMAT = 1;

export interface Document {
  format: typeof DOCUMENT_FORMAT;
  title: TitleBlock;
  /** How small counts are hidden in this document (see suppress.ts); renderers print the legend from it. */
  suppression: SuppressionLegend;
  /** Sections in reading order. A section's level is its depth: top-level sections are level 1, at most 3. */
  sections: Section[];
  /** Footnotes referenced by `footnote` on inline runs; renderers number them in order of first reference. */
  footnotes: Footnote[];
}

export interface TitleBlock {
  title: string;
  subtitle?: string;
  /** Shown under the title, e.g. "12 March 2025 · Fenceline 0.1.0 · results of run 3". */
  dateLine: string;
  /** Fixed creation time of the document (ISO 8601, e.g. "2025-03-12T09:30:00Z"), written into file
   *  metadata instead of the clock so that the same document always renders to the same bytes. */
  createdAt: string;
  /** Short lines naming where the numbers come from: data file, SHA-256, rows, settings. */
  provenance: string[];
  /** Written to file metadata (PDF Author, DOCX creator). */
  author?: string;
  /** BCP 47 language tag for HTML and PDF metadata; "en" when absent. */
  language?: string;
}

export interface SuppressionLegend {
  /** Counts from 1 to this number are hidden; 0 means suppression is off. */
  threshold: number;
  /** Text printed in a cell hidden because it is a small count, e.g. "≤10". */
  smallMark: string;
  /** Text printed in a cell hidden because a small count could be worked out from it. */
  derivedMark: string;
  /** One sentence each, printed under any table that hides a cell. */
  smallLegend: string;
  derivedLegend: string;
}

export interface Section {
  /** Stable anchor (HTML ids, DOCX bookmarks, XLSX sheet lookups); unique within the document. */
  id: string;
  heading: string;
  blocks: Block[];
  /** Sub-sections, printed after this section's own blocks. */
  sections?: Section[];
  /** Hint: start this section on a new page (PDF, DOCX, printed HTML). */
  pageBreakBefore?: boolean;
}

export type Block =
  | Paragraph
  | KeyFinding
  | BulletList
  | Table
  | Figure
  | Note
  | Glossary
  | PageBreak;

// ---------------------------------------------------------------------------------------------
// Inline content

export type Inline = TextRun | NumberRun | SuppressedRun;

export type TextStyle = 'plain' | 'bold' | 'italic' | 'boldItalic';

export interface TextRun {
  kind: 'text';
  text: string;
  style?: TextStyle;
  /** Id of a Footnote; the renderer prints its number as a mark after the run. */
  footnote?: string;
}

/** A number in running text, kept as a number so every renderer formats it the same way
 *  (format.ts) and a test can compare it with results.json. */
export interface NumberRun {
  kind: 'number';
  value: number;
  format: NumberFormat;
  style?: TextStyle;
  footnote?: string;
  /** Where the value comes from (see NumberSource); the memo test checks it against results.json. */
  source?: NumberSource;
}

/**
 * Where a printed number comes from: a path into results.json such as
 * "outcomes[0].byDelta[1].ci[0]", a ratio or difference of two paths ("a / b", "a - b",
 * "(a - b) / c"), "abs(a)", or "constant:NAME" for a fixed constant of the method (named in
 * main/report/model/memo-constants.ts). Plain text: the tree stays JSON.
 */
export type NumberSource = string;

/** A count hidden in running text (e.g. "≤10 rows were excluded"). The value is not kept. */
export interface SuppressedRun {
  kind: 'suppressed';
  reason: SuppressionReason;
  style?: TextStyle;
  footnote?: string;
}

export type SuppressionReason = 'small' | 'derived';

/**
 * How a number is written. Renderers use formatNumber (format.ts) for text and the matching
 * spreadsheet format (excelNumberFormat) in XLSX, so the two agree.
 *  - integer: thousands separators, no decimals (counts).
 *  - decimal: fixed decimals (estimates, standard errors).
 *  - percent: the value is a proportion (0.25 → "25.0%").
 *  - pvalue: three decimals, "< 0.001" below that.
 * `unit` is appended with a space (e.g. "USD", "days"); `signed` writes "+" before positive values.
 */
export interface NumberFormat {
  style: 'integer' | 'decimal' | 'percent' | 'pvalue';
  decimals?: number;
  unit?: string;
  signed?: boolean;
}

// ---------------------------------------------------------------------------------------------
// Blocks

export interface Paragraph {
  kind: 'paragraph';
  runs: Inline[];
}

/** The boxed statement at the top of the memo, in plain words. */
export interface KeyFinding {
  kind: 'keyFinding';
  title: string;
  body: Array<Paragraph | BulletList>;
}

export interface BulletList {
  kind: 'list';
  ordered?: boolean;
  items: Inline[][];
}

export type Align = 'left' | 'right' | 'center';

export interface TableColumn {
  header: string;
  align: Align;
  /** Format of NumberCell values in this column unless the cell gives its own. */
  format?: NumberFormat;
  /** Relative width (any positive number; renderers share the page width in proportion). */
  width?: number;
}

export type Cell = TextCell | NumberCell | SuppressedCell | EmptyCell;

export interface TextCell { kind: 'text'; text: string; footnote?: string }
export interface NumberCell { kind: 'number'; value: number; format?: NumberFormat; footnote?: string; source?: NumberSource }
/** A hidden count, or a figure from which one could be worked out. The value is not kept. */
export interface SuppressedCell { kind: 'suppressed'; reason: SuppressionReason }
/** Nothing to show (not applicable); printed blank. */
export interface EmptyCell { kind: 'empty' }

export interface TableRow {
  cells: Cell[];
  /** Totals and summary rows are set in bold. */
  emphasis?: 'total';
}

export interface Table {
  kind: 'table';
  /** Stable id; also the XLSX sheet's source (sheet name from `sheetName`, else from the caption). */
  id: string;
  caption: string;
  /** At most 31 characters (an Excel limit); renderers shorten the caption when absent. */
  sheetName?: string;
  columns: TableColumn[];
  rows: TableRow[];
  /** Printed under the table, before the suppression legend. */
  notes?: Inline[][];
}

export interface Figure {
  kind: 'figure';
  id: string;
  chart: ChartSpec;
  caption: string;
  /** Text alternative for screen readers and for anyone who cannot see the image. */
  alt: string;
}

export type NoteTone = 'caution' | 'limitation' | 'info';

export interface Note {
  kind: 'note';
  tone: NoteTone;
  title?: string;
  body: Paragraph[];
}

export interface GlossaryEntry {
  term: string;
  definition: Inline[];
}

export interface Glossary {
  kind: 'glossary';
  entries: GlossaryEntry[];
}

/** A hint: start a new page here when the format has pages. */
export interface PageBreak {
  kind: 'pageBreak';
}

export interface Footnote {
  id: string;
  body: Inline[];
}
