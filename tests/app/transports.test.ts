import { describe, expect, it } from 'vitest';
import { createApiClient } from '../../app/lib/api-client.ts';
import { httpTransport, TOKEN_HEADER } from '../../app/lib/http-transport.ts';
import { UPLOAD_ENDPOINT, UPLOAD_MAX_BYTES, UPLOAD_NAME_HEADER } from '../../main/contract/api.ts';
import { ipcTransport } from '../../app/lib/ipc-transport.ts';
import type { FencelineBridge, ShellEvent } from '../../main/contract/bridge.ts';

type Sent = { url: string; headers: Record<string, string>; body: unknown };

function fakeFetch(answer: (s: Sent) => { status: number; body: unknown }) {
  const sent: Sent[] = [];
  const fetchImpl = async (url: string, init: { method: string; headers: Record<string, string>; body?: string | Blob }) => {
    const s = { url, headers: init.headers, body: typeof init.body === 'string' ? JSON.parse(init.body) : null };
    sent.push(s);
    const a = answer(s);
    return { status: a.status, json: async () => a.body };
  };
  return { sent, fetchImpl };
}

describe('browser mode transport', () => {
  it('sends the token in a header, never in the address', async () => {
    const f = fakeFetch(() => ({ status: 200, body: { ok: true, value: { samples: [] } } }));
    const api = createApiClient(httpTransport('tok-123', f.fetchImpl));
    const r = await api.call('samples.list', {});
    expect(r).toEqual({ ok: true, value: { samples: [] } });
    expect(f.sent[0]!.headers[TOKEN_HEADER]).toBe('tok-123');
    expect(f.sent[0]!.url).toBe('/api/call');
    expect(f.sent[0]!.url).not.toMatch(/tok/);
  });
  it('follows a long call as a job: progress, then the answer; cancelling posts to the job', async () => {
    let polls = 0;
    const f = fakeFetch((s) => {
      if (s.url === '/api/jobs') return { status: 200, body: { jobId: 'a'.repeat(24) } };
      if (s.url.endsWith('/cancel')) return { status: 200, body: { cancelled: true } };
      polls++;
      return polls < 3
        ? { status: 200, body: { state: 'running', progress: { stage: 'propensity', done: polls, total: 3 } } }
        : { status: 200, body: { state: 'done', result: { ok: false, error: { kind: 'cancelled', problems: [] } } } };
    });
    const seen: number[] = [];
    const controller = new AbortController();
    const api = createApiClient(httpTransport('t', f.fetchImpl));
    const pending = api.call('study.evaluate', { studyPath: 's.json', outDir: 'o' }, { onProgress: (p) => seen.push(p.done), signal: controller.signal });
    controller.abort();
    const r = await pending;
    expect(r.ok).toBe(false);
    expect(seen).toEqual([1, 2]);
    expect(f.sent.some((s) => s.url === `/api/jobs/${'a'.repeat(24)}/cancel`)).toBe(true);
  });
  it('tells the job of a long call as it starts, and a reloaded page follows it again by that handle', async () => {
    const id = 'b'.repeat(24);
    let polls = 0;
    const f = fakeFetch((s) => {
      if (s.url === '/api/jobs') return { status: 200, body: { jobId: id } };
      if (s.url === `/api/jobs/${id}`) {
        polls++;
        return polls < 4 ? { status: 200, body: { state: 'running', progress: { stage: 'import', done: polls, total: 4 } } } : { status: 200, body: { state: 'done', result: { ok: true, value: 42 } } };
      }
      return { status: 404, body: { error: 'No such job.' } };
    });
    const api = createApiClient(httpTransport('t', f.fetchImpl));
    let handle = '';
    const first = api.call('data.check', { study: {} }, { onStarted: (h) => { handle = h; } });
    expect(await first).toEqual({ ok: true, value: 42 });
    expect(handle).toBe(id);
    polls = 1; // as after a reload: the job is still running on the host
    const seen: number[] = [];
    expect(await api.resume('data.check', handle, { onProgress: (p) => seen.push(p.done) })).toEqual({ ok: true, value: 42 });
    expect(seen).toEqual([2, 3]);
    expect(await api.resume('data.check', 'c'.repeat(24), {})).toBeNull(); // a job the host no longer knows
    expect(await api.resume('data.check', '../etc', {})).toBeNull();
  });
  it('turns a refused token into a plain answer, not an exception', async () => {
    const f = fakeFetch(() => ({ status: 403, body: {} }));
    const r = await createApiClient(httpTransport('bad', f.fetchImpl)).call('samples.list', {});
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems[0]!.message).toMatch(/not allowed to call the engine/);
  });
});

describe('Electron transport', () => {
  it('matches progress events to its own call and stops listening afterwards', async () => {
    const listeners = new Set<(e: ShellEvent) => void>();
    let lastCallId = '';
    const bridge: FencelineBridge = {
      async invoke(_m, _a, callId) {
        lastCallId = callId!;
        for (const l of listeners) { l({ kind: 'progress', callId: 'someone-else', progress: { stage: 'x', done: 9, total: 9 } }); l({ kind: 'progress', callId, progress: { stage: 'x', done: 1, total: 2 } }); }
        return { ok: true, value: 1 };
      },
      async cancel() {},
      subscribe(l) { listeners.add(l); return () => listeners.delete(l); },
    };
    const seen: number[] = [];
    const r = await createApiClient(ipcTransport(bridge)).call('samples.list', {}, { onProgress: (p) => seen.push(p.done) });
    expect(r).toEqual({ ok: true, value: 1 });
    expect(seen).toEqual([1]);
    expect(lastCallId).not.toBe('');
    expect(listeners.size).toBe(0);
  });
});

describe('handing a picked file to the host (browser mode upload)', () => {
  type Posted = { url: string; headers: Record<string, string>; body: unknown };
  const uploadFetch = (answer: (p: Posted) => { status: number; body: unknown }) => {
    const posted: Posted[] = [];
    const fetchImpl = async (url: string, init: { method: string; headers: Record<string, string>; body?: string | Blob }) => {
      const p = { url, headers: init.headers, body: init.body };
      posted.push(p);
      const a = answer(p);
      return { status: a.status, json: async () => a.body };
    };
    return { posted, fetchImpl };
  };
  const file = (name: string, text: string) => { const body = new Blob([text]); return { name, size: body.size, body }; };

  it('posts the raw bytes with the token and the URI-encoded name, and answers where the host keeps the copy', async () => {
    const kept = { path: '/ws/uploads/abc/Année 2025 — ménages.csv', name: 'Année 2025 — ménages.csv', bytes: 9, sha256: 'f'.repeat(64) };
    const f = uploadFetch(() => ({ status: 200, body: { ok: true, value: kept } }));
    const api = createApiClient(httpTransport('tok-9', f.fetchImpl));
    expect(api.canUpload).toBe(true);
    const r = await api.upload(file('Année 2025 — ménages.csv', 'ID,INC\n1,2'));
    expect(r).toEqual({ ok: true, value: kept });
    const p = f.posted[0]!;
    expect(p.url).toBe(UPLOAD_ENDPOINT);
    expect(p.headers[TOKEN_HEADER]).toBe('tok-9');
    expect(decodeURIComponent(p.headers[UPLOAD_NAME_HEADER]!)).toBe('Année 2025 — ménages.csv');
    expect(p.headers[UPLOAD_NAME_HEADER]).toMatch(/^[\x21-\x7e]+$/); // a header value must be plain ASCII
    expect(await (p.body as Blob).text()).toBe('ID,INC\n1,2');
  });
  it('refuses a file over the size limit before sending anything, in plain words', async () => {
    const f = uploadFetch(() => ({ status: 200, body: {} }));
    const huge = { name: 'big.csv', size: UPLOAD_MAX_BYTES + 1, body: new Blob(['x']) };
    const r = await createApiClient(httpTransport('t', f.fetchImpl)).upload(huge);
    expect(f.posted).toHaveLength(0);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.problems[0]!.message).toMatch(/big\.csv is 512 MB; files up to 512 MB/);
  });
  it('passes the host\'s refusal through (413 with its message), and a refused token as a plain answer', async () => {
    const refusal = { ok: false, error: { kind: 'input', problems: [{ path: 'file', message: 'too big' }] } };
    const r = await createApiClient(httpTransport('t', uploadFetch(() => ({ status: 413, body: refusal })).fetchImpl)).upload(file('a.csv', 'x'));
    expect(r).toEqual(refusal);
    const denied = await createApiClient(httpTransport('t', uploadFetch(() => ({ status: 403, body: {} })).fetchImpl)).upload(file('a.csv', 'x'));
    expect(denied.ok).toBe(false);
    if (!denied.ok) expect(denied.error.problems[0]!.message).toMatch(/not allowed to call the engine/);
    const garbled = await createApiClient(httpTransport('t', uploadFetch(() => ({ status: 500, body: 'oops' })).fetchImpl)).upload(file('a.csv', 'x'));
    expect(garbled.ok).toBe(false);
    if (!garbled.ok) expect(garbled.error.problems[0]!.message).toMatch(/a\.csv could not be handed/);
  });
  it('in Electron there is no upload: the native dialog picks files', async () => {
    const bridge: FencelineBridge = { invoke: async () => ({ ok: true, value: null }), cancel: async () => {}, subscribe: () => () => {} };
    const api = createApiClient(ipcTransport(bridge));
    expect(api.canUpload).toBe(false);
    const r = await api.upload(file('a.csv', 'x'));
    expect(r.ok).toBe(false);
  });
});
