// The renderer's api client. It knows the contract (method names, argument and result types)
// but not the transport: browser mode sends calls over HTTP with the per-launch token, the
// Electron shell through the preload's invoke. Screens only ever see `ApiClient`.

import type { ApiMethod, ApiMethods, ApiResult, ProgressEvent, UploadedFile } from '../../main/contract/api.ts';

/** A file the analyst picked or dropped (a browser File is one). */
export interface PickedFile {
  name: string;
  size: number;
  /** The bytes, as fetch sends them (a File or Blob). */
  readonly body: Blob;
}

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
  /** Hand a picked file to the host, which keeps a copy in the workspace (browser mode); absent where the host picks files itself (Electron's dialog). */
  upload?(file: PickedFile): Promise<ApiResult<UploadedFile>>;
}

export interface ApiClient {
  call<M extends ApiMethod>(method: M, args: ApiMethods[M]['args'], options?: CallOptions): Promise<ApiResult<ApiMethods[M]['result']>>;
  /** Follow a long call of `method` started before a reload; null when it cannot be followed (gone, or a host that cannot). */
  resume<M extends ApiMethod>(method: M, handle: string, options?: CallOptions): Promise<ApiResult<ApiMethods[M]['result']> | null>;
  /** Can files be handed over by picking or dropping them in the page (browser mode)? */
  readonly canUpload: boolean;
  upload(file: PickedFile): Promise<ApiResult<UploadedFile>>;
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
    canUpload: transport.upload !== undefined,
    async upload(file) {
      if (!transport.upload) return { ok: false, error: { kind: 'input', problems: [{ path: 'file', message: 'Here files are chosen with “Choose a file…”, which opens your computer’s own file window.' }] } };
      try {
        return await transport.upload(file);
      } catch (e) {
        return transportFailure(e instanceof Error ? e.message : String(e));
      }
    },
  };
}
