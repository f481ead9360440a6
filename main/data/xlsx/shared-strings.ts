// The shared string table of a workbook (ECMA-376 Part 1 §18.4: sst, si, t, rich-text runs r
// §18.4.4 and phonetic runs rPh §18.4.6), read chunk by chunk from the inflated part.
// An item's text is its t element, or the t elements of its runs joined; phonetic readings
// (rPh) are not part of the cell's text. An item with neither runs nor text is null, which
// reads as an empty cell (as exceljs reads it).

import { bytesAre, find, GT, leafString, leafText, localStart, LT, nameEnd, newLeafText, newTagScan, scanTag, XmlDamage } from './xml-bytes.ts';

export class SharedStringsParser {
  readonly strings: Array<string | null> = [];
  private pending: Buffer | null = null;
  private inItem = false;
  private inPhonetic = 0;
  private runs = 0;
  private text = '';
  private readonly tag = newTagScan();
  private readonly leaf = newLeafText();

  feed(chunk: Buffer): void {
    const b = this.pending === null || this.pending.length === 0 ? chunk : Buffer.concat([this.pending, chunk]);
    const used = this.parse(b);
    this.pending = used < b.length ? b.subarray(used) : null;
  }

  /** The table, once the whole part was fed. Throws XmlDamage when the part ended early. */
  finish(): Array<string | null> {
    if (this.pending !== null && this.pending.toString('latin1').trim() !== '') throw new XmlDamage('shared strings end inside a tag');
    if (this.inItem) throw new XmlDamage('shared strings end inside an item');
    return this.strings;
  }

  /** Parse complete markup; returns how many bytes were used. */
  private parse(b: Buffer): number {
    let p = 0;
    const n = b.length;
    while (p < n) {
      const lt = find(b, LT, p);
      if (lt < 0) return n;
      if (lt + 1 >= n) return lt;
      const c = b[lt + 1]!;
      if (c === 47 /* / */) {
        const gt = find(b, GT, lt + 2);
        if (gt < 0) return lt;
        let e = gt;
        while (e > lt + 2 && (b[e - 1] === 32 || b[e - 1] === 9 || b[e - 1] === 10 || b[e - 1] === 13)) e--;
        const s = localStart(b, lt + 2, e);
        if (bytesAre(b, s, e, 'si')) this.endItem();
        else if (bytesAre(b, s, e, 'r')) { if (this.inPhonetic === 0) this.runs++; }
        else if (bytesAre(b, s, e, 'rPh')) this.inPhonetic = Math.max(0, this.inPhonetic - 1);
        p = gt + 1;
        continue;
      }
      if (c === 63 /* ? */ || c === 33 /* ! */) {
        const end = skipSpecial(b, lt);
        if (end < 0) return lt;
        p = end;
        continue;
      }
      const ne = nameEnd(b, lt + 1);
      if (ne < 0) return lt;
      const s = localStart(b, lt + 1, ne);
      const tag = scanTag(b, ne, this.tag);
      if (tag.end < 0) return lt;
      if (bytesAre(b, s, ne, 'si')) {
        this.inItem = true;
        this.runs = 0;
        this.text = '';
        this.inPhonetic = 0;
        if (tag.selfClosing) this.endItem();
      } else if (bytesAre(b, s, ne, 't')) {
        if (!tag.selfClosing) {
          const leaf = leafText(b, tag.end, this.leaf);
          if (leaf.next < 0) return lt;
          if (this.inItem && this.inPhonetic === 0) this.text += leafString(b, leaf);
          p = leaf.next;
          continue;
        }
      } else if (bytesAre(b, s, ne, 'rPh')) {
        if (!tag.selfClosing) this.inPhonetic++;
      }
      p = tag.end + 1;
    }
    return n;
  }

  private endItem(): void {
    if (!this.inItem) return;
    this.strings.push(this.runs > 0 || this.text !== '' ? this.text : null);
    this.inItem = false;
  }
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
