// The renderer's api client. It knows the contract (method names, argument and result types)
// but not the transport: browser mode sends calls over HTTP with the per-launch token, the
// Electron shell through the preload's invoke. Screens only ever see `ApiClient`.

import type { ApiMethod, ApiMethods, ApiResult, ProgressEvent } from '../../main/contract/api.ts';

export interface CallOptions {
  /** Follow long work (study.evaluate, data.preview, data.check). */
  onProgress?: (p: ProgressEvent) => void;
  /** Abort to cancel: the answer is then `{ ok: false, error: { kind: 'cancelled' } }`. */
  signal?: AbortSignal;
  /** Told the handle of long work as soon as it starts, so a reloaded page can follow it again (`resume`). */
  onStarted?: (handle: string) => void;
}

/** Moves one call to the main side and back; the answer is untyped until the client types it. */
export interface Transport {
  call(method: string, args: unknown, options: CallOptions): Promise<ApiResult<unknown>>;
  /** Follow long work started before (its handle from onStarted); null when the host no longer knows it. */
  resume?(handle: string, options: CallOptions): Promise<ApiResult<unknown> | null>;
}

export interface ApiClient {
  call<M extends ApiMethod>(method: M, args: ApiMethods[M]['args'], options?: CallOptions): Promise<ApiResult<ApiMethods[M]['result']>>;
  /** Follow a long call of `method` started before a reload; null when it cannot be followed (gone, or a host that cannot). */
  resume<M extends ApiMethod>(method: M, handle: string, options?: CallOptions): Promise<ApiResult<ApiMethods[M]['result']> | null>;
}

/** What the answer is when the transport itself fails (server gone, window closing). */
export function transportFailure(detail: string): ApiResult<never> {
  return { ok: false, error: { kind: 'input', problems: [{ path: '', message: `Fenceline's engine did not answer (${detail}). If you closed the terminal or the server stopped, start it again with npm start.` }] } };
}

export function createApiClient(transport: Transport): ApiClient {
  return {
    async call(method, args, options = {}) {
      try {
        return (await transport.call(method, args, options)) as ApiResult<never>;
      } catch (e) {
        return transportFailure(e instanceof Error ? e.message : String(e));
      }
    },
    async resume(_method, handle, options = {}) {
      if (!transport.resume) return null;
      try {
        return (await transport.resume(handle, options)) as ApiResult<never> | null;
      } catch {
        return null;
      }
    },
  };
}
