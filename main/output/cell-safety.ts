// Spreadsheet formula injection (OWASP, "CSV Injection"): a text cell that begins with =, +, -, @,
// a tab or a carriage return may be taken for a formula by a spreadsheet program that opens the
// file (a unit ID such as =HYPERLINK(…) or +cmd|…). Such text is written with a single quote in
// front, which spreadsheets show as text; numbers (and text that is a plain number, such as the ID
// -5) are left as they are.

const FORMULA_START = /^[=+\-@\t\r]/;
const PLAIN_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export function neutralizeText(text: string): string {
  return FORMULA_START.test(text) && !PLAIN_NUMBER.test(text) ? `'${text}` : text;
}
