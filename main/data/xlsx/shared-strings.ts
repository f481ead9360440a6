// The shared string table of a workbook (ECMA-376 Part 1 §18.4: sst, si, t, rich-text runs r
// §18.4.4 and phonetic runs rPh §18.4.6), read chunk by chunk from the inflated part.
// An item's text is its t element, or the t elements of its runs joined; phonetic readings
// (rPh) are not part of the cell's text. An item with neither runs nor text is null, which
// reads as an empty cell (as exceljs reads it).

import { bytesAre, leafString, leafText, XmlDamage } from './xml-bytes.ts';
import { ChunkedXmlReader } from './xml-chunks.ts';

export class SharedStringsParser extends ChunkedXmlReader {
  readonly strings: Array<string | null> = [];
  private inItem = false;
  private inPhonetic = 0;
  private runs = 0;
  private text = '';

  /** The table, once the whole part was fed. Throws XmlDamage when the part ended early. */
  finish(): Array<string | null> {
    this.checkEnded('the shared strings');
    if (this.inItem) throw new XmlDamage('shared strings end inside an item');
    return this.strings;
  }

  protected endTag(b: Buffer, s: number, e: number): void {
    if (bytesAre(b, s, e, 'si')) this.endItem();
    else if (bytesAre(b, s, e, 'r')) { if (this.inPhonetic === 0) this.runs++; }
    else if (bytesAre(b, s, e, 'rPh')) this.inPhonetic = Math.max(0, this.inPhonetic - 1);
  }

  protected startTag(b: Buffer, s: number, ne: number): number {
    const tag = this.tag;
    if (bytesAre(b, s, ne, 'si')) {
      this.inItem = true;
      this.runs = 0;
      this.text = '';
      this.inPhonetic = 0;
      if (tag.selfClosing) this.endItem();
    } else if (bytesAre(b, s, ne, 't')) {
      if (!tag.selfClosing) {
        const leaf = leafText(b, tag.end, this.leaf);
        if (leaf.next < 0) return -1;
        if (this.inItem && this.inPhonetic === 0) this.text += leafString(b, leaf);
        return leaf.next;
      }
    } else if (bytesAre(b, s, ne, 'rPh')) {
      if (!tag.selfClosing) this.inPhonetic++;
    }
    return tag.end + 1;
  }

  private endItem(): void {
    if (!this.inItem) return;
    this.strings.push(this.runs > 0 || this.text !== '' ? this.text : null);
    this.inItem = false;
  }
}
