// Byte-level helpers for reading the XML parts of a workbook straight from the inflated bytes
// (UTF-8, XML 1.0). Only what the narrow readers of sheet-rows.ts and shared-strings.ts need:
// the end of a tag (quotes respected), the attributes r, t and s, the text of a leaf element
// (entities, CDATA sections, end-of-line handling) and numbers without building strings.

import { xmlUnescape } from '../zip-check.ts';

export const LT = 60; // <
export const GT = 62; // >
const SLASH = 47;
const QUOTE = 34;
const APOS = 39;
const EQUALS = 61;
const COLON = 58;

/** The part is not well-formed enough to be read (reported as a damaged sheet). */
export class XmlDamage extends Error {}

/** Result of scanning one start tag. */
export interface TagScan {
  /** Index of the closing '>' (or -1 when the tag does not end inside the buffer). */
  end: number;
  selfClosing: boolean;
  /** Start and end (exclusive) of the values of attributes r, t and s, or -1. */
  rStart: number;
  rEnd: number;
  tStart: number;
  tEnd: number;
  sStart: number;
  sEnd: number;
}

export function newTagScan(): TagScan {
  return { end: -1, selfClosing: false, rStart: -1, rEnd: -1, tStart: -1, tEnd: -1, sStart: -1, sEnd: -1 };
}

/**
 * Index of `byte` at or after `from`, or -1. A plain loop: the markup of a sheet has a '<'
 * every few bytes, and for such short hops this is several times faster than Buffer#indexOf,
 * whose cost is mostly the call into the runtime.
 */
export function find(b: Uint8Array, byte: number, from: number): number {
  const n = b.length;
  for (let i = from; i < n; i++) if (b[i] === byte) return i;
  return -1;
}

function isSpace(c: number): boolean {
  return c === 32 || c === 9 || c === 10 || c === 13;
}

/**
 * Scan a start tag whose name ends at `p` (XML 1.0 §3.1 STag / EmptyElemTag), noting the
 * one-letter attributes r, t and s. Quoted values may hold '>' (XML 1.0 §3.1 AttValue).
 */
export function scanTag(b: Buffer, p: number, out: TagScan): TagScan {
  out.rStart = out.tStart = out.sStart = -1;
  out.selfClosing = false;
  const n = b.length;
  while (p < n) {
    const c = b[p]!;
    if (c === GT) {
      out.end = p;
      return out;
    }
    if (c === SLASH) {
      if (p + 1 >= n) break;
      if (b[p + 1] !== GT) throw new XmlDamage('stray / in a tag');
      out.selfClosing = true;
      out.end = p + 1;
      return out;
    }
    if (isSpace(c)) {
      p++;
      continue;
    }
    // attribute name
    const nameStart = p;
    while (p < n && b[p] !== EQUALS && !isSpace(b[p]!) && b[p] !== GT && b[p] !== SLASH) p++;
    const nameLength = p - nameStart;
    while (p < n && isSpace(b[p]!)) p++;
    if (p >= n) break;
    if (b[p] !== EQUALS) throw new XmlDamage('attribute without a value');
    p++;
    while (p < n && isSpace(b[p]!)) p++;
    if (p >= n) break;
    const q = b[p]!;
    if (q !== QUOTE && q !== APOS) throw new XmlDamage('attribute value without quotes');
    const close = find(b, q, p + 1);
    if (close < 0) break;
    if (nameLength === 1) {
      const a = b[nameStart]!;
      if (a === 114 /* r */) { out.rStart = p + 1; out.rEnd = close; }
      else if (a === 116 /* t */) { out.tStart = p + 1; out.tEnd = close; }
      else if (a === 115 /* s */) { out.sStart = p + 1; out.sEnd = close; }
    }
    p = close + 1;
  }
  out.end = -1;
  return out;
}

/** Index just past the element name that starts at `p`, and where its local name starts (after a prefix). */
export function nameEnd(b: Buffer, p: number): number {
  const n = b.length;
  while (p < n) {
    const c = b[p]!;
    if (c === GT || c === SLASH || isSpace(c)) return p;
    p++;
  }
  return -1;
}

export function localStart(b: Buffer, start: number, end: number): number {
  for (let i = end - 1; i >= start; i--) if (b[i] === COLON) return i + 1;
  return start;
}

/** Do bytes [start, end) spell `word` (ASCII)? */
export function bytesAre(b: Buffer, start: number, end: number, word: string): boolean {
  if (end - start !== word.length) return false;
  for (let i = 0; i < word.length; i++) if (b[start + i] !== word.charCodeAt(i)) return false;
  return true;
}

/** Text of raw character data (no markup inside): XML 1.0 §2.11 end-of-line handling, then entities (§4.6) and character references (§4.1). */
export function decodeText(b: Buffer, start: number, end: number): string {
  let s = b.toString('utf8', start, end);
  if (s.includes('\r')) s = s.replace(/\r\n?/g, '\n');
  if (s.includes('&')) s = xmlUnescape(s);
  return s;
}

/** Where a leaf element's content ends: the '<' of its end tag, or -1 when not in the buffer. */
export interface LeafText {
  /** Index just past the end tag's '>' (or -1 when the element is not complete in the buffer). */
  next: number;
  /** Content start and end when the content is plain character data, else -1 (then `text` holds it). */
  start: number;
  end: number;
  text: string | null;
}

export function newLeafText(): LeafText {
  return { next: -1, start: -1, end: -1, text: null };
}

/**
 * Read the content of a leaf element (v, t) whose start tag ended at `gt`. Plain content is
 * returned as a byte range; content with CDATA sections (XML 1.0 §2.7) or comments is decoded.
 */
export function leafText(b: Buffer, gt: number, out: LeafText): LeafText {
  const from = gt + 1;
  const lt = find(b, LT, from);
  out.text = null;
  if (lt < 0 || lt + 1 >= b.length) {
    out.next = -1;
    return out;
  }
  if (b[lt + 1] === SLASH) {
    const close = find(b, GT, lt + 2);
    if (close < 0) {
      out.next = -1;
      return out;
    }
    out.start = from;
    out.end = lt;
    out.next = close + 1;
    return out;
  }
  // Mixed content: character data, CDATA sections, comments, processing instructions.
  let text = '';
  let p = from;
  for (;;) {
    const at = b.indexOf(LT, p);
    if (at < 0 || at + 1 >= b.length) { out.next = -1; return out; }
    text += decodeText(b, p, at);
    const c = b[at + 1];
    if (c === SLASH) {
      const close = b.indexOf(GT, at + 2);
      if (close < 0) { out.next = -1; return out; }
      out.next = close + 1;
      out.start = out.end = -1;
      out.text = text;
      return out;
    }
    if (b.toString('latin1', at, Math.min(b.length, at + 9)) === '<![CDATA[') {
      const close = b.indexOf(']]>', at + 9, 'latin1');
      if (close < 0) { out.next = -1; return out; }
      text += b.toString('utf8', at + 9, close);
      p = close + 3;
    } else if (b.toString('latin1', at, Math.min(b.length, at + 4)) === '<!--') {
      const close = b.indexOf('-->', at + 4, 'latin1');
      if (close < 0) { out.next = -1; return out; }
      p = close + 3;
    } else if (c === 63 /* ? */) {
      const close = b.indexOf('?>', at + 2, 'latin1');
      if (close < 0) { out.next = -1; return out; }
      p = close + 2;
    } else {
      throw new XmlDamage('an element inside a value');
    }
  }
}

/** Text of a leaf element read by leafText. */
export function leafString(b: Buffer, leaf: LeafText): string {
  return leaf.text ?? decodeText(b, leaf.start, leaf.end);
}

// Powers of ten exactly representable as doubles (10^0 .. 10^22).
const POW10 = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * parseFloat of the bytes [start, end), without a string in the common case: at most 15
 * digits, an optional sign and decimal point, no exponent. Then the digits form an integer
 * m < 2^53 and the value is m / 10^k with k ≤ 15, one correctly rounded IEEE 754 division of
 * two exact doubles, hence the same double as a correctly rounded decimal conversion gives
 * (W. D. Clinger, "How to Read Floating Point Numbers Accurately", PLDI 1990, the fast path).
 */
export function floatAt(b: Buffer, start: number, end: number): number {
  let i = start;
  let negative = false;
  if (i < end && b[i] === 45) { negative = true; i++; }
  let m = 0;
  let digits = 0;
  let fraction = -1;
  for (; i < end; i++) {
    const c = b[i]!;
    if (c >= 48 && c <= 57) {
      m = m * 10 + (c - 48);
      digits++;
    } else if (c === 46 && fraction < 0) {
      fraction = digits;
    } else {
      return Number.parseFloat(decodeText(b, start, end));
    }
  }
  if (digits === 0 || digits > 15) return Number.parseFloat(decodeText(b, start, end));
  const k = fraction < 0 ? 0 : digits - fraction;
  const v = k === 0 ? m : m / POW10[k]!;
  return negative ? -v : v;
}

/** parseInt(text, 10) of the bytes [start, end), without a string when they are plain digits. */
export function intAt(b: Buffer, start: number, end: number): number {
  let m = 0;
  if (end - start === 0 || end - start > 15) return Number.parseInt(decodeText(b, start, end), 10);
  for (let i = start; i < end; i++) {
    const c = b[i]!;
    if (c < 48 || c > 57) return Number.parseInt(decodeText(b, start, end), 10);
    m = m * 10 + (c - 48);
  }
  return m;
}

/** Where the name of the end tag '</name >' starting at `lt` (its '>' at `gt`) ends: trailing spaces are allowed (XML 1.0 §3.1 ETag). */
export function endTagNameEnd(b: Uint8Array, lt: number, gt: number): number {
  let e = gt;
  while (e > lt + 2 && (b[e - 1] === 32 || b[e - 1] === 9 || b[e - 1] === 10 || b[e - 1] === 13)) e--;
  return e;
}

/** End of a comment, processing instruction, CDATA section or declaration starting at `lt`, or -1. */
export function skipSpecial(b: Buffer, lt: number): number {
  if (b[lt + 1] === 63) {
    const e = b.indexOf('?>', lt + 2, 'latin1');
    return e < 0 ? -1 : e + 2;
  }
  const head = b.toString('latin1', lt, Math.min(b.length, lt + 9));
  if (head.length < 9 && '<![CDATA['.startsWith(head)) return -1;
  if (head.length < 4) return -1;
  if (head.startsWith('<!--')) {
    const e = b.indexOf('-->', lt + 4, 'latin1');
    return e < 0 ? -1 : e + 3;
  }
  if (head === '<![CDATA[') {
    const e = b.indexOf(']]>', lt + 9, 'latin1');
    return e < 0 ? -1 : e + 3;
  }
  const e = b.indexOf(GT, lt + 2);
  return e < 0 ? -1 : e + 1;
}
