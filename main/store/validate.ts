// Checks of the values handed to the repositories. The renderer is untrusted (ARCHITECTURE.md),
// so every field is checked at run time and each wrong one gets its own sentence.

import type { Problem } from './types.ts';

/** ISO 8601 date-time as written by Date.prototype.toISOString and most tools (ISO 8601-1:2019). */
const ISO_DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/;
const SHA256_HEX = /^[0-9a-f]{64}$/i;

export function checkText(value: unknown, path: string, what: string, problems: Problem[]): value is string {
  if (typeof value === 'string' && value.trim() !== '') return true;
  problems.push({ path, message: `${what} is missing or empty; give it as text.` });
  return false;
}

export function checkTimestamp(value: unknown, path: string, what: string, problems: Problem[]): value is string {
  if (typeof value === 'string' && ISO_DATE_TIME.test(value) && !Number.isNaN(Date.parse(value))) return true;
  problems.push({ path, message: `${what} must be a date and time in ISO 8601 form, such as 2025-03-01T14:30:00Z (got ${preview(value)}).` });
  return false;
}

export function checkSha256(value: unknown, path: string, what: string, problems: Problem[]): value is string {
  if (typeof value === 'string' && SHA256_HEX.test(value)) return true;
  problems.push({ path, message: `${what} must be a SHA-256 digest written as 64 hexadecimal digits (got ${preview(value)}).` });
  return false;
}

/** A stored id or version: a whole number from 1 up. */
export function isPositiveId(value: unknown): value is number {
  return typeof value === 'number' && Number.isSafeInteger(value) && value >= 1;
}

/** A short, safe rendering of a wrong value for a message. */
export function preview(value: unknown): string {
  if (value === undefined) return 'nothing';
  if (typeof value === 'string') return value.length > 40 ? `"${value.slice(0, 40)}..."` : `"${value}"`;
  if (typeof value === 'number' || typeof value === 'boolean' || value === null) return String(value);
  if (Array.isArray(value)) return 'a list';
  if (ArrayBuffer.isView(value)) return `a ${value.constructor.name}`;
  return `a ${typeof value}`;
}
