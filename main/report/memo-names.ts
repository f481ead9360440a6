// The memo formats this version writes and their file names (docs/cli.md: memo.pdf, memo.html,
// memo.docx, tables.xlsx). Constants only, so that the command line can read them without loading
// the memo's builder or renderers (memo-files.ts).

import type { OutputFormat } from '../contract/api.ts';

export const MEMO_FILE_NAMES: Readonly<Record<OutputFormat, string>> = {
  pdf: 'memo.pdf',
  html: 'memo.html',
  docx: 'memo.docx',
  xlsx: 'tables.xlsx',
};

/** The memo formats this version can write. */
export const AVAILABLE_MEMO_FORMATS: readonly OutputFormat[] = ['pdf', 'html', 'docx', 'xlsx'];
