// The data methods of the app: preview a workbook or CSV before it is mapped, and check a study
// that is not saved yet (what will be used, what excluded and why). They adapt main/data and
// the pipeline's preparation step; the analysis itself runs through study.evaluate.

import { isAbsolute, resolve } from 'node:path';
import type { ApiResult, CheckReport, DataCheckArgs, DataPreview, DataPreviewArgs, PreviewColumn } from '../contract/api.ts';
import { displayText } from '../data/find-column.ts';
import { readTable } from '../data/read-table.ts';
import { CellKind, type RawColumn } from '../data/types.ts';
import { getOwn, isPlainObject } from '../rules/json-read.ts';
import { checkValidatedStudy } from './check.ts';
import { validateStudy } from '../studyfile/validate.ts';
import { suggestRoles, type ColumnFacts, type ProgramColumns } from '../data/suggest-roles.ts';
import { readProblem, refuseIf, studyFilesProblems } from './access.ts';
import { refuse } from './context.ts';
import type { HostContext } from './host.ts';

const PREVIEW_ROWS = 20;
const DISTINCT_LOOK = 1000;

function factsOf(column: RawColumn, rowCount: number): ColumnFacts & { blanks: number } {
  let numbers = 0, text = 0, blanks = 0;
  let zeroOne = true;
  for (let r = 0; r < rowCount; r++) {
    const k = column.kinds[r];
    if (k === CellKind.Blank) { blanks++; continue; }
    if (k === CellKind.Number || k === CellKind.TextNumber || k === CellKind.Date || k === CellKind.Bool) {
      numbers++;
      const v = column.numbers[r];
      if (v !== 0 && v !== 1) zeroOne = false;
    } else text++;
  }
  const holds: PreviewColumn['holds'] = numbers + text === 0 ? 'empty' : text === 0 ? 'numbers' : numbers === 0 ? 'text' : 'mixed';
  const looked = Math.min(rowCount, DISTINCT_LOOK);
  const seen = new Set<string>();
  let filled = 0;
  for (let r = 0; r < looked; r++) {
    if (column.kinds[r] === CellKind.Blank) continue;
    filled++;
    seen.add(displayText(column, r));
  }
  // A few stray text cells (typing slips the validation report will list) do not make a numeric column text.
  const mostlyNumbers = numbers > 0 && text <= 0.01 * (numbers + text);
  return { name: column.name, holds, mostlyNumbers, distinct: seen.size, looked: filled, zeroOne: zeroOne && mostlyNumbers, blanks };
}

/** The variables of a program being edited (it need not be valid yet). */
function programColumns(program: unknown): ProgramColumns | null {
  if (!isPlainObject(program)) return null;
  const vars = getOwn(program, 'variables');
  if (!Array.isArray(vars)) return null;
  const variables = vars.flatMap((v) => {
    if (!isPlainObject(v)) return [];
    const key = getOwn(v, 'key'), column = getOwn(v, 'column'), label = getOwn(v, 'label');
    // A variable whose column is not chosen yet is matched by its key and label.
    return typeof key === 'string' && key !== '' ? [{ key, column: typeof column === 'string' ? column : '', label: typeof label === 'string' && label ? label : key }] : [];
  });
  return { variables };
}

export async function previewData(args: DataPreviewArgs, ctx: HostContext = {}): Promise<ApiResult<DataPreview>> {
  const path = resolve(args.path);
  const denied = refuseIf(readProblem(ctx, path, 'path'));
  if (denied) return denied;
  const read = await readTable(path, {
    ...(args.sheet ? { sheet: args.sheet } : {}),
    ...(args.headerRow !== undefined ? { headerRow: args.headerRow } : {}),
    ...(ctx.signal ? { signal: ctx.signal } : {}),
    ...(ctx.onProgress ? { onProgress: (p) => ctx.onProgress!({ stage: 'import', done: p.done, total: p.total }) } : {}),
  });
  if (!read.ok) return refuse(read.problems);
  const t = read.value;
  const facts = t.columns.map((c) => factsOf(c, t.rowCount));
  const suggestions = suggestRoles(facts, programColumns(args.program));
  const shown = Math.min(PREVIEW_ROWS, t.rowCount);
  return {
    ok: true,
    value: {
      path,
      fileName: t.source.fileName,
      format: t.source.format,
      sheets: t.source.sheets,
      sheet: t.source.sheet,
      headerRow: t.headerRow,
      rowCount: t.rowCount,
      columns: t.columns.map((c, i) => ({
        name: c.name, letter: c.letter, holds: facts[i]!.holds, blanks: facts[i]!.blanks, distinct: facts[i]!.distinct, suggestion: suggestions[i] ?? null,
      })),
      rows: Array.from({ length: shown }, (_, r) => ({ row: t.rowNumbers[r]!, cells: t.columns.map((c) => displayText(c, r)) })),
      notes: t.notes,
    },
  };
}

/** The validation report of a study before it is saved or run (study.check works on a saved file). */
export async function checkDraftStudy(args: DataCheckArgs, ctx: HostContext = {}): Promise<ApiResult<CheckReport>> {
  const checked = validateStudy(args.study);
  if (!checked.ok) return refuse(checked.problems);
  const study = checked.value;
  const baseDir = args.baseDir ?? process.cwd();
  if (!isAbsolute(study.data.path) && args.baseDir === undefined) {
    return refuse([{ path: 'data.path', message: `The data file ${study.data.path} is given without its folder. Choose the file again so its full location is known.` }]);
  }
  // A draft comes from the page: every file it names must be allowed itself (it vouches for nothing).
  const denied = studyFilesProblems(ctx, study, baseDir);
  if (denied.length) return refuse(denied);
  return checkValidatedStudy(study, baseDir, ctx);
}
