// Free text from the results (warnings, reading notes) is written for the analyst and can carry
// counts, row numbers, IDs and example values: "1 row has no APPLICANT_ID (row 3102)", "3254 dates
// were read", "(1: EARNINGS_12M is blank)". None of that may reach a memo meant for others
// (docs/method.md, "Disclosure control"): a small count is a small cell; a large one can give a
// small one away by subtraction from a count printed elsewhere (the ledger, memo-counts.ts, cannot
// see counts inside free text); a row number, an ID or an example value points at one unit; and
// singular wording ("1 row has") tells a count of one even when the number is hidden.
//
// So, when suppression is on, every count in such a sentence is replaced by words, whatever its
// size: "the 15994 units" → "the units", "1 row has" → "some rows have" (the noun and the verb that
// follows it are put in the plural, so the wording does not tell one from several); parentheses
// listing rows, examples ("such as …") or a breakdown by reason ("(208: …; 1: …)") are dropped. A
// number counts something when a count noun (units, rows, values, IDs, the program's unit word …)
// follows within the same clause. Decimals and numbers after "delta", "F", "p", "=" or "steps of"
// are left alone. Over-hiding is the safe side. The full sentences stay in results.json, the
// analyst's own file.

const COUNT_NOUNS = ['unit', 'row', 'key', 'id', 'value', 'cluster', 'people', 'person', 'number', 'date', 'cell', 'entry', 'record', 'case', 'applicant', 'household', 'pupil', 'observation', 'file', 'sheet', 'column'];

const PLURAL_VERBS: Record<string, string> = {
  is: 'are', was: 'were', has: 'have', does: 'do', appears: 'appear', matches: 'match', lies: 'lie',
  falls: 'fall', remains: 'remain', needs: 'need', holds: 'hold', lacks: 'lack', contains: 'contain', gives: 'give',
};

function plural(word: string): string {
  if (/\(s\)$/.test(word)) return word.slice(0, -3) + 's';
  if (/(s|people)$/i.test(word)) return word;
  if (/(x|ch|sh)$/i.test(word)) return word + 'es';
  if (/[^aeiou]y$/i.test(word)) return word.slice(0, -1) + 'ies';
  if (/^person$/i.test(word)) return 'people';
  return word + 's';
}

function singular(word: string): string {
  const w = word.toLowerCase().replace(/\(s\)$/, '');
  if (w === 'people' || w === 'persons') return 'person';
  if (w.endsWith('ies')) return w.slice(0, -3) + 'y';
  if (/(x|ch|sh)es$/.test(w)) return w.slice(0, -2);
  return w.endsWith('s') && !w.endsWith('ss') ? w.slice(0, -1) : w;
}

/** Parentheses that list rows, example values or IDs, or break a count down by reason. */
const DROPPED_PARENTHESES = [
  /\s*\((?:in |on |at |see )?rows?\b[^()]*\)/gi,
  /\s*\((?:such as|e\.g\.|for example|first|like)\b[^()]*\)/gi,
  /\s*\(\s*\d[\d,]*\s*:[^()]*\)/g,
  /\s*\(\s*ids?\b[^()]*\)/gi,
];

/** The sentence for a memo meant for others (see above); unchanged when suppression is off. */
export function shareableText(message: string, threshold: number, extraNouns: readonly string[] = []): string {
  if (threshold <= 0) return message;
  const nouns = new Set([...COUNT_NOUNS, ...extraNouns.map((n) => singular(n))]);
  let s = message.replace(/([A-Za-z]+)\(s\)/g, (_, w: string) => plural(w));
  for (const re of DROPPED_PARENTHESES) s = s.replace(re, '');
  // Trailing "row 3102" / "rows 206, 322 and 204 more" outside parentheses.
  s = s.replace(/,?\s*\b(?:in |on |at )?rows? \d[\d,]*(?:(?:,| and| or)\s*\d[\d,]*)*(?: and \d[\d,]* more)?/gi, '');
  const out: string[] = [];
  let last = 0;
  const re = /(^|[^\d.,=A-Za-z_-])(\d{1,3}(?:,\d{3})+|\d+)(?![\d.,]\d)(?![\d%])/g;
  let m: RegExpExecArray | null;
  while ((m = re.exec(s))) {
    const [, before, digits] = m as unknown as [string, string, string];
    const start = m.index + before.length;
    const end = start + digits.length;
    const value = Number(digits.replace(/,/g, ''));
    const head = s.slice(Math.max(0, start - 10), start).toLowerCase();
    if (value === 0 || /(delta|\bf|\bp|=|step|steps of|version|since)\s*$/.test(head)) continue;
    const clause = s.slice(end).split(/[.;:()]/)[0]!;
    const words = [...clause.matchAll(/[A-Za-z_()]+/g)].slice(0, 6);
    const nounAt = words.findIndex((w) => nouns.has(singular(w[0])));
    if (nounAt < 0) continue;
    // Drop the number ("the 15994 units" → "the units"), or say "some".
    const theBefore = /\bthe\s*$/i.test(s.slice(0, start));
    out.push(s.slice(last, start));
    let rest = clause;
    const noun = words[nounAt]!;
    const nounEnd = noun.index! + noun[0].length;
    rest = rest.slice(0, noun.index!).replace(/\s+(?:\d{1,3}(?:,\d{3})+|\d+)(?=\s)/g, '') + plural(noun[0]) + rest.slice(nounEnd).replace(/\b(is|was|has|does|appears|matches|lies|falls|remains|needs|holds|lacks|contains|gives)\b/, (v) => PLURAL_VERBS[v]!);
    out.push(theBefore ? rest.replace(/^\s+/, '') : 'some' + rest);
    last = end + clause.length;
    re.lastIndex = last;
  }
  out.push(s.slice(last));
  return out.join('').replace(/\s{2,}/g, ' ').replace(/\s+([,.;])/g, '$1').replace(/(^|[.!?]\s+)some\b/g, '$1Some');
}
