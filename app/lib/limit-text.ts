// Numbers typed into rule forms: a number stays a number; anything else is kept as written (an
// expression such as "35000 + 7000 * (size - 3)") for the validator to judge. Pure.

export function limitFromText(text: string): number | string {
  const t = text.trim();
  if (t !== '' && /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(t)) return Number(t);
  return t;
}

export const limitToText = (v: unknown): string => (v === undefined || v === null ? '' : String(v));

/** "1, 2, 3" → [1, 2, 3]; entries that are not numbers stay text (value labels). */
export function listFromText(text: string): Array<number | string> {
  return text.split(',').map((s) => s.trim()).filter((s) => s !== '').map(limitFromText);
}
