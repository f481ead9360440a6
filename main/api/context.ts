// What every api method shares: how a caller follows and stops long work, and how an input
// problem becomes an answer rather than an exception.

import type { ApiResult, ProgressEvent } from '../contract/api.ts';
import { IMPORT_CANCELLED } from '../data/read-table.ts';
import type { Problem } from '../rules/types.ts';

/** How a caller follows and stops long work (not part of the wire contract: each transport adapts it). */
export interface CallContext {
  onProgress?: (p: ProgressEvent) => void;
  signal?: AbortSignal;
}

export const refuse = (problems: Problem[]): ApiResult<never> => {
  const cancelled = problems.some((p) => p.message === IMPORT_CANCELLED);
  return { ok: false, error: { kind: cancelled ? 'cancelled' : 'input', problems } };
};

/** A stage stopped by its signal (design/cancelled.ts), as the api's answer. */
export const cancelled = (e: Error): ApiResult<never> => ({ ok: false, error: { kind: 'cancelled', problems: [{ path: '', message: e.message }] } });
