// units.csv (docs/cli.md): one row per unit used — id, z, d (when given), and aps_<delta> per
// delta. Numbers are written with every digit JavaScript needs to read them back exactly
// (ECMA-262 Number::toString); fields are quoted per RFC 4180 when needed, and IDs that a
// spreadsheet would take for a formula are neutralised (cell-safety.ts).

import { neutralizeText } from './cell-safety.ts';

export interface UnitColumns {
  ids: string[];
  z: Float64Array;
  d: Float64Array | null;
  deltas: readonly number[];
  aps: readonly Float64Array[];
}

const quote = (s: string) => (/[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
const num = (v: number) => (Number.isFinite(v) ? String(v) : '');

export function unitsCsv(u: UnitColumns): string {
  const header = ['id', 'z', ...(u.d ? ['d'] : []), ...u.deltas.map((d) => `aps_${d}`)];
  const lines = [header.join(',')];
  for (let r = 0; r < u.ids.length; r++) {
    const cells = [quote(neutralizeText(u.ids[r]!)), num(u.z[r]!)];
    if (u.d) cells.push(num(u.d[r]!));
    for (const a of u.aps) cells.push(num(a[r]!));
    lines.push(cells.join(','));
  }
  return lines.join('\r\n') + '\r\n';
}
