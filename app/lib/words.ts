// Small pieces of English the screens need: counts with their nouns, "a" or "an". Pure.

import { count } from './format.ts';

/** "1 unit", "2,191 units"; irregular plurals given. */
export function counted(n: number, singular: string, plural = `${singular}s`): string {
  return `${count(n)} ${Math.round(n) === 1 ? singular : plural}`;
}

/** "a household", "an applicant", "an 18-year-old" (by the first letter's sound, common practice; exceptions are rare in unit names). */
export function withArticle(noun: string): string {
  const w = noun.trim();
  if (w === '') return w;
  return `${/^([aeiou]|8|11\b|18\b|hour|honest|heir)/i.test(w) && !/^(uni|use|usu|one|eu)/i.test(w) ? 'an' : 'a'} ${w}`;
}
