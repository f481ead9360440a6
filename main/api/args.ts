// Run-time checks of api arguments. Calls from the renderer (over IPC or HTTP) are untrusted:
// every method declares the shape of its arguments and a call that does not fit is refused with
// a problem per field, before any work is done.

import { describeGiven, getOwn, isPlainObject } from '../rules/json-read.ts';
import type { Problem } from '../rules/types.ts';

export type Shape =
  | 'string' | 'number' | 'integer' | 'boolean' | 'unknown'
  | { list: Shape; max?: number }
  | { oneOf: readonly string[] }
  | { object: Record<string, Shape>; optional?: readonly string[] };

export function checkShape(value: unknown, shape: Shape, path: string, out: Problem[] = []): Problem[] {
  if (shape === 'unknown') return out;
  if (shape === 'string') { if (typeof value !== 'string') out.push({ path, message: `${path} must be text; found ${describeGiven(value)}.` }); return out; }
  if (shape === 'number') { if (typeof value !== 'number' || !Number.isFinite(value)) out.push({ path, message: `${path} must be a number; found ${describeGiven(value)}.` }); return out; }
  if (shape === 'integer') { if (typeof value !== 'number' || !Number.isInteger(value)) out.push({ path, message: `${path} must be a whole number; found ${describeGiven(value)}.` }); return out; }
  if (shape === 'boolean') { if (typeof value !== 'boolean') out.push({ path, message: `${path} must be true or false; found ${describeGiven(value)}.` }); return out; }
  if ('oneOf' in shape) { if (typeof value !== 'string' || !shape.oneOf.includes(value)) out.push({ path, message: `${path} must be one of ${shape.oneOf.join(', ')}; found ${describeGiven(value)}.` }); return out; }
  if ('list' in shape) {
    if (!Array.isArray(value)) { out.push({ path, message: `${path} must be a list; found ${describeGiven(value)}.` }); return out; }
    if (shape.max !== undefined && value.length > shape.max) { out.push({ path, message: `${path} has ${value.length} entries; at most ${shape.max} are allowed.` }); return out; }
    value.forEach((v, i) => checkShape(v, shape.list, `${path}[${i}]`, out));
    return out;
  }
  if (!isPlainObject(value)) { out.push({ path, message: `${path} must be an object; found ${describeGiven(value)}.` }); return out; }
  for (const key of Object.keys(value)) if (!(key in shape.object)) out.push({ path: `${path}.${key}`, message: `${path} has no field "${key}".` });
  for (const [key, sub] of Object.entries(shape.object)) {
    const v = getOwn(value, key);
    if (v === undefined) { if (!shape.optional?.includes(key)) out.push({ path: `${path}.${key}`, message: `${path}.${key} is missing.` }); continue; }
    checkShape(v, sub, `${path}.${key}`, out);
  }
  return out;
}

/**
 * Propensity worker threads a call may ask for: 0 (none) up to the computer's cores. More threads
 * than cores only add memory and switching (each loads the data's columns), so more are refused.
 */
export function workersProblem(workers: number | undefined, at: string, cores: number): Problem | null {
  if (workers === undefined || (workers >= 0 && workers <= cores)) return null;
  return { path: at, message: `${at} must be from 0 (no worker threads) to ${cores}, the cores of this computer; found ${workers}.` };
}
