// exceljs's streaming WorkbookReader reading a workbook and nothing else (every cell visited): the
// reader Fenceline used before its own (main/data/xlsx/), kept as the comparator of the import
// and whole-evaluate benchmarks (tests/bench/import.bench.ts, evaluate-xlsx.bench.ts).

import { createReadStream } from 'node:fs';
import ExcelJS from 'exceljs';

/** exceljs's streaming reader alone, with the options readTable uses; touches every cell value. */
export async function exceljsAlone(path: string): Promise<number> {
  const file = createReadStream(path);
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(file, { worksheets: 'emit', sharedStrings: 'cache', styles: 'cache', hyperlinks: 'ignore', entries: 'ignore' });
  let cells = 0;
  for await (const worksheet of reader) {
    for await (const row of worksheet) {
      const values = row.values as unknown[];
      for (let c = 1; c < values.length; c++) if (values[c] !== undefined) cells++;
    }
  }
  return cells;
}
