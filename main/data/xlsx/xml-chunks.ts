// The loop both narrow readers share: markup read from inflated chunks as they arrive. What a
// chunk ends in the middle of (a tag, a value) is kept and read again with the next chunk, so a
// reader sees only whole tags and whole leaf values (XML 1.0 §3.1 tags, §2.5–2.8 comments,
// processing instructions, CDATA sections and declarations, which are skipped).

import { endTagNameEnd, find, GT, localStart, LT, nameEnd, newLeafText, newTagScan, scanTag, skipSpecial, XmlDamage } from './xml-bytes.ts';

export abstract class ChunkedXmlReader {
  private pending: Buffer | null = null;
  protected readonly tag = newTagScan();
  protected readonly leaf = newLeafText();

  feed(chunk: Buffer): void {
    const b = this.pending === null || this.pending.length === 0 ? chunk : Buffer.concat([this.pending, chunk]);
    const used = this.parse(b);
    this.pending = used < b.length ? b.subarray(used) : null;
  }

  /** Throws XmlDamage when the part ended inside a tag. */
  protected checkEnded(what: string): void {
    if (this.pending !== null && this.pending.toString('latin1').trim() !== '') throw new XmlDamage(`${what} ends inside a tag`);
  }

  /** An end tag whose local name is b[s, e). */
  protected abstract endTag(b: Buffer, s: number, e: number): void;

  /** A start tag whose local name is b[s, ne), scanned into `this.tag`. Returns where to go on, or -1 when its content is not all in the buffer yet. */
  protected abstract startTag(b: Buffer, s: number, ne: number): number;

  /** Read whole markup; returns how many bytes were used. */
  private parse(b: Buffer): number {
    const n = b.length;
    let p = 0;
    while (p < n) {
      const lt = find(b, LT, p);
      if (lt < 0) return n;
      if (lt + 1 >= n) return lt;
      const c1 = b[lt + 1]!;
      if (c1 === 47 /* / */) {
        const gt = find(b, GT, lt + 2);
        if (gt < 0) return lt;
        const e = endTagNameEnd(b, lt, gt);
        this.endTag(b, localStart(b, lt + 2, e), e);
        p = gt + 1;
      } else if (c1 === 63 /* ? */ || c1 === 33 /* ! */) {
        const end = skipSpecial(b, lt);
        if (end < 0) return lt;
        p = end;
      } else {
        const ne = nameEnd(b, lt + 1);
        if (ne < 0) return lt;
        scanTag(b, ne, this.tag);
        if (this.tag.end < 0) return lt;
        const next = this.startTag(b, localStart(b, lt + 1, ne), ne);
        if (next < 0) return lt;
        p = next;
      }
    }
    return n;
  }
}
