import { describe, expect, it } from 'vitest';
import { createApiClient } from '../../app/lib/api-client.ts';
import { httpTransport, TOKEN_HEADER } from '../../app/lib/http-transport.ts';
import { ipcTransport } from '../../app/lib/ipc-transport.ts';
import type { FencelineBridge, ShellEvent } from '../../main/contract/bridge.ts';

type Sent = { url: string; headers: Record<string, string>; body: unknown };

function fakeFetch(answer: (s: Sent) => { status: number; body: unknown }) {
  const sent: Sent[] = [];
  const fetchImpl = async (url: string, init: { method: string; headers: Record<string, string>; body?: string }) => {
    const s = { url, headers: init.headers, body: init.body ? JSON.parse(init.body) : null };
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
