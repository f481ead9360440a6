// Whole numbers with thousands separators exactly as toLocaleString('en-US') writes them, without
// ICU's number formatting: its first use in a process costs tens of milliseconds, a noticeable
// part of `check`'s whole run. Anything but a safe integer is left to toLocaleString.

export function countText(v: number): string {
  if (!Number.isSafeInteger(v) || Object.is(v, -0)) return v.toLocaleString('en-US');
  const digits = String(Math.abs(v));
  let out = '';
  for (let i = 0; i < digits.length; i++) {
    if (i > 0 && (digits.length - i) % 3 === 0) out += ',';
    out += digits[i];
  }
  return v < 0 ? `-${out}` : out;
}
