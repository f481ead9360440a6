// Free text from the results (warnings, notes) can carry counts: "3 unit(s) have no cluster id".
// Before such a sentence is printed, every whole number from 1 to the small-cell threshold that
// counts something (followed, within the same clause, by a word for units, rows or the program's
// unit) is replaced by the small-cell mark. Over-hiding is the safe side: a number that merely
// looks like a count is hidden too. Decimals ("delta 0.1") and numbers after "delta", "F", "p"
// or "=" are left alone.

const COUNT_NOUNS = ['unit', 'units', 'unit(s)', 'row', 'rows', 'row(s)', 'key', 'keys', 'id', 'ids', 'value', 'values', 'cluster', 'clusters', 'people', 'person', 'persons', 'number', 'numbers', 'date', 'dates', 'cell', 'cells', 'entry', 'entries', 'record', 'records', 'case', 'cases', 'applicant', 'applicants'];

export function scrubSmallCounts(message: string, threshold: number, mark: string, extraNouns: readonly string[] = []): string {
  if (threshold <= 0) return message;
  const nouns = new Set([...COUNT_NOUNS, ...extraNouns.map((n) => n.toLowerCase())]);
  return message.replace(/(^|[^\d.,=])(\d{1,3}(?:,\d{3})*|\d+)(?![\d.,]\d)/g, (whole, before: string, digits: string, offset: number) => {
    const value = Number(digits.replace(/,/g, ''));
    if (!(value >= 1 && value <= threshold)) return whole;
    const head = message.slice(Math.max(0, offset - 8), offset + before.length).toLowerCase();
    if (/(delta|\bf|\bp|=|step|steps of|version)\s*$/.test(head)) return whole;
    const start = offset + before.length + digits.length;
    const clause = message.slice(start, start + 60).split(/[.;()]/)[0]!.toLowerCase();
    const words = clause.match(/[a-z()]+/g) ?? [];
    return words.slice(0, 6).some((w) => nouns.has(w) || nouns.has(w.replace(/\(s\)$/, '')) || nouns.has(w.replace(/s$/, '')))
      ? before + mark
      : whole;
  });
}
