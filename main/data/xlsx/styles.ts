// Which cell styles show a number as a date or time (ECMA-376 Part 1 §18.8: cellXfs §18.8.10,
// xf §18.8.45 numFmtId, numFmts/numFmt §18.8.30–31). A cell's s attribute indexes cellXfs; the
// xf's numFmtId is a built-in format (§18.8.30 lists them: ids 14–22 and 45–47 are dates and
// times) or one of the workbook's own numFmt codes, which show a date or time when they use a
// date/time code (d, m, y, h, s) outside quoted text and [bracketed] sections.

import { xmlUnescape } from '../zip-check.ts';

const BUILT_IN_DATE_IDS = new Set([14, 15, 16, 17, 18, 19, 20, 21, 22, 45, 46, 47]);

/**
 * Does this format code show a date or time? Quoted text ("..."), bracketed sections
 * ([Red], [$-409], [h]) and the character after a backslash (an escaped literal) are not codes;
 * the codes are d, m, y, h and s (ECMA-376 Part 1 §18.8.31, in lower case as Excel writes them;
 * exceljs reads them the same way).
 */
export function isDateFormatCode(code: string): boolean {
  const bare = code.replace(/\[[^\]]*\]/g, '').replace(/"[^"]*"/g, '').replace(/\\./g, '');
  return /[dmyhs]/.test(bare);
}

const TAG_ATTRIBUTES = String.raw`((?:[^>"']|"[^"]*"|'[^']*')*)`;

function attributesOf(tag: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const m of tag.matchAll(/([\w:.-]+)\s*=\s*(?:"([^"]*)"|'([^']*)')/g)) out.set(m[1]!, xmlUnescape(m[2] ?? m[3] ?? ''));
  return out;
}

/** One flag per cellXfs entry: 1 when the style shows numbers as dates. */
export function dateStylesOf(stylesXml: string): Uint8Array {
  const custom = new Map<number, string>();
  for (const m of stylesXml.matchAll(new RegExp(`<(?:\\w+:)?numFmt\\b${TAG_ATTRIBUTES}>`, 'g'))) {
    const a = attributesOf(m[1]!);
    const id = Number(a.get('numFmtId'));
    const code = a.get('formatCode');
    if (Number.isInteger(id) && code !== undefined) custom.set(id, code);
  }
  const section = /<(?:\w+:)?cellXfs\b[^>]*>([\s\S]*?)<\/(?:\w+:)?cellXfs\s*>/.exec(stylesXml);
  if (section === null) return new Uint8Array(0);
  const flags: number[] = [];
  for (const m of section[1]!.matchAll(new RegExp(`<(?:\\w+:)?xf\\b${TAG_ATTRIBUTES}>`, 'g'))) {
    const id = Number.parseInt(attributesOf(m[1]!).get('numFmtId') ?? '0', 10);
    const code = custom.get(id);
    flags.push(code !== undefined ? (isDateFormatCode(code) ? 1 : 0) : BUILT_IN_DATE_IDS.has(id) ? 1 : 0);
  }
  return Uint8Array.from(flags);
}

/** The 1904 date system (ECMA-376 Part 1 §18.2.28 workbookPr date1904; xsd:boolean "1" or "true"). */
export function usesDate1904(workbookXml: string): boolean {
  const m = new RegExp(`<(?:\\w+:)?workbookPr\\b${TAG_ATTRIBUTES}>`).exec(workbookXml);
  if (m === null) return false;
  const v = attributesOf(m[1]!).get('date1904');
  return v === '1' || v === 'true';
}
