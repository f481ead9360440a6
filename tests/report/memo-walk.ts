// Test helpers for the memo: walk every number node of a document, and resolve a number's
// `source` in results.json with a reader written apart from the memo model's own (memo-source.ts),
// so the two do not share a mistake.

import type { Cell, Document, Inline, NumberFormat, Section, Table, TableColumn } from '../../main/report/model/document.ts';
import { DEFAULT_NUMBER_FORMAT, flattenSections } from '../../main/report/model/format.ts';
import { MEMO_CONSTANTS } from '../../main/report/model/memo-constants.ts';

export interface NumberNode { value: number; format: NumberFormat; source: string | undefined; where: string }

function pathValue(root: unknown, path: string): unknown {
  if (!/^[A-Za-z_][A-Za-z0-9_]*(\.[A-Za-z_][A-Za-z0-9_]*|\[\d+\])*$/.test(path)) throw new Error(`bad path ${path}`);
  const tokens = [...path.matchAll(/([A-Za-z_][A-Za-z0-9_]*)|\[(\d+)\]/g)];
  let cur: unknown = root;
  for (const t of tokens) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = t[1] !== undefined ? (cur as Record<string, unknown>)[t[1]] : (cur as unknown[])[Number(t[2])];
  }
  return cur;
}

/** The number a source names: a path, abs(path), a / b, (a - b) / c, a - b, or constant:NAME. */
export function resolveSource(results: unknown, source: string): number {
  const s = source.trim();
  let m: RegExpExecArray | null;
  if (s.startsWith('constant:')) {
    const v = (MEMO_CONSTANTS as Record<string, number>)[s.slice(9)];
    if (typeof v !== 'number') throw new Error(`unknown constant ${s}`);
    return v;
  }
  if ((m = /^abs\((.+)\)$/.exec(s))) return Math.abs(resolveSource(results, m[1]!));
  if ((m = /^\((.+)\) \/ (.+)$/.exec(s))) return resolveSource(results, m[1]!) / resolveSource(results, m[2]!);
  if ((m = /^(.+) \/ (.+)$/.exec(s))) return resolveSource(results, m[1]!) / resolveSource(results, m[2]!);
  if ((m = /^(.+) - (.+)$/.exec(s))) return resolveSource(results, m[1]!) - resolveSource(results, m[2]!);
  const v = pathValue(results, s);
  if (typeof v !== 'number') throw new Error(`results.${s} is not a number: ${JSON.stringify(v)}`);
  return v;
}

export interface Walked {
  numbers: NumberNode[];
  /** Every text the memo prints apart from numbers: runs, text cells, headings, captions, table headers, with the section id. */
  texts: Array<{ text: string; section: string }>;
}

export function walk(doc: Document): Walked {
  const numbers: NumberNode[] = [];
  const texts: Walked['texts'] = [];
  const inline = (runs: readonly Inline[], where: string, section: string) => {
    for (const r of runs) {
      if (r.kind === 'number') numbers.push({ value: r.value, format: r.format, source: r.source, where });
      else if (r.kind === 'text') texts.push({ text: r.text, section });
    }
  };
  const cell = (c: Cell, col: TableColumn, where: string, section: string) => {
    if (c.kind === 'number') numbers.push({ value: c.value, format: c.format ?? col.format ?? DEFAULT_NUMBER_FORMAT, source: c.source, where });
    else if (c.kind === 'text') texts.push({ text: c.text, section });
  };
  const table = (t: Table, section: string) => {
    texts.push({ text: t.caption, section });
    t.columns.forEach((c) => texts.push({ text: c.header, section }));
    t.rows.forEach((row, i) => row.cells.forEach((c, j) => cell(c, t.columns[j]!, `${t.id} row ${i + 1} column ${j + 1}`, section)));
    (t.notes ?? []).forEach((n) => inline(n, `${t.id} notes`, section));
  };
  for (const { section } of flattenSections(doc)) {
    const s: Section = section;
    texts.push({ text: s.heading, section: s.id });
    s.blocks.forEach((b, i) => {
      const where = `${s.id} block ${i + 1}`;
      switch (b.kind) {
        case 'paragraph': inline(b.runs, where, s.id); break;
        case 'keyFinding':
          texts.push({ text: b.title, section: s.id });
          for (const x of b.body) { if (x.kind === 'paragraph') inline(x.runs, where, s.id); else x.items.forEach((it) => inline(it, where, s.id)); }
          break;
        case 'list': b.items.forEach((it) => inline(it, where, s.id)); break;
        case 'note': if (b.title) texts.push({ text: b.title, section: s.id }); b.body.forEach((p) => inline(p.runs, where, s.id)); break;
        case 'glossary': b.entries.forEach((e) => { texts.push({ text: e.term, section: s.id }); inline(e.definition, where, s.id); }); break;
        case 'table': table(b, s.id); break;
        case 'figure': texts.push({ text: b.caption, section: s.id }, { text: b.alt, section: s.id }); break;
        case 'pageBreak': break;
      }
    });
  }
  doc.footnotes.forEach((f) => inline(f.body, `footnote ${f.id}`, 'footnotes'));
  return { numbers, texts };
}

/** Every string anywhere in a JSON value. */
export function allStrings(value: unknown, out: Set<string> = new Set()): Set<string> {
  if (typeof value === 'string') out.add(value);
  else if (Array.isArray(value)) value.forEach((v) => allStrings(v, out));
  else if (value && typeof value === 'object') Object.values(value).forEach((v) => allStrings(v, out));
  return out;
}
