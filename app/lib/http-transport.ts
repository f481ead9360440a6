// Browser mode's transport: every call is a POST under /api/ carrying the per-launch token in a
// header (never in the address, so it does not end up in logs or history). Long calls start a
// job and poll its progress; cancelling posts to the job.

import { UPLOAD_ENDPOINT, UPLOAD_MAX_BYTES, UPLOAD_NAME_HEADER, type ApiResult, type ProgressEvent, type UploadedFile } from '../../main/contract/api.ts';
import type { CallOptions, PickedFile, Transport } from './api-client.ts';

export const TOKEN_HEADER = 'X-Fenceline-Token';

type Fetch = (url: string, init: { method: string; headers: Record<string, string>; body?: string | Blob }) => Promise<{ status: number; json(): Promise<unknown> }>;

const megabytes = (n: number) => `${Math.round(n / (1024 * 1024)).toLocaleString('en-US')} MB`;

export interface JobStatus {
  state: 'running' | 'done';
  progress?: ProgressEvent | null;
  result?: ApiResult<unknown>;
}

const POLL_MS = 150;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export function httpTransport(token: string, fetchImpl: Fetch, base = ''): Transport {
  const headers = { 'Content-Type': 'application/json', [TOKEN_HEADER]: token };
  const post = async (path: string, body: unknown) => {
    const r = await fetchImpl(`${base}${path}`, { method: 'POST', headers, body: JSON.stringify(body) });
    if (r.status === 401 || r.status === 403) throw new Error('this page is not allowed to call the engine; open the address the terminal printed');
    return r.json();
  };
  /** Poll a job to its answer, passing progress on; cancel it when the signal aborts. Null when the server does not know it. */
  const follow = async (jobId: string, options: CallOptions): Promise<ApiResult<unknown> | null> => {
    let cancelSent = false;
    const cancel = () => { if (!cancelSent) { cancelSent = true; void post(`/api/jobs/${jobId}/cancel`, {}); } };
    options.signal?.addEventListener('abort', cancel);
    if (options.signal?.aborted) cancel();
    try {
      for (;;) {
        const s = (await post(`/api/jobs/${jobId}`, {})) as Partial<JobStatus>;
        if (s.state === undefined) return null; // 404: no such job (the server was restarted)
        if (s.state === 'done' && s.result) return s.result;
        if (s.progress) options.onProgress?.(s.progress);
        await sleep(POLL_MS);
      }
    } finally {
      options.signal?.removeEventListener('abort', cancel);
    }
  };
  return {
    // The raw bytes of a picked file, its own name in a header (URI-encoded: names may hold any
    // character); the host keeps the copy and answers where (main/contract/api.ts, UPLOAD_ENDPOINT).
    async upload(file: PickedFile): Promise<ApiResult<UploadedFile>> {
      if (file.size > UPLOAD_MAX_BYTES) {
        return { ok: false, error: { kind: 'input', problems: [{ path: 'file', message: `${file.name} is ${megabytes(file.size)}; files up to ${megabytes(UPLOAD_MAX_BYTES)} can be opened here. Save the columns the study needs in a smaller file, or use the desktop app.` }] } };
      }
      const r = await fetchImpl(`${base}${UPLOAD_ENDPOINT}`, {
        method: 'POST',
        headers: { 'Content-Type': 'application/octet-stream', [TOKEN_HEADER]: token, [UPLOAD_NAME_HEADER]: encodeURIComponent(file.name) },
        body: file.body,
      });
      if (r.status === 401 || r.status === 403) throw new Error('this page is not allowed to call the engine; open the address the terminal printed');
      const answer = await r.json().catch(() => null) as ApiResult<UploadedFile> | null;
      if (answer && typeof answer === 'object' && 'ok' in answer) return answer;
      return { ok: false, error: { kind: 'input', problems: [{ path: 'file', message: `${file.name} could not be handed to Fenceline's engine (answer ${r.status}). Try again; if it keeps failing, type the file's location instead.` }] } };
    },
    async call(method, args, options: CallOptions) {
      if (!options.onProgress && !options.signal && !options.onStarted) return (await post('/api/call', { method, args })) as ApiResult<unknown>;
      const { jobId } = (await post('/api/jobs', { method, args })) as { jobId: string };
      options.onStarted?.(jobId);
      const answer = await follow(jobId, options);
      return answer ?? { ok: false, error: { kind: 'input', problems: [{ path: '', message: 'The engine lost track of this work (it was restarted). Start it again.' }] } };
    },
    resume: (jobId, options) => (/^[0-9a-f]{24}$/.test(jobId) ? follow(jobId, options) : Promise.resolve(null)),
  };
}
