// The Electron shell's pure parts (main/electron/policy.ts, bridge.ts), tested without the
// Electron runtime: window options, method filtering in the preload, navigation and request
// rules, renderer file paths, and the progress rate (at most 10 events a second).

import { describe, expect, it } from 'vitest';
import { API_METHODS } from '../../main/contract/api.ts';
import { IPC_CHANNELS, type ShellEvent } from '../../main/contract/bridge.ts';
import { createBridge, type IpcLike } from '../../main/electron/bridge.ts';
import { mayNavigate, mayRequest, rendererFile, throttleProgress, windowOptions } from '../../main/electron/policy.ts';

describe('the window', () => {
  it('isolates the page: context isolation, sandbox, no Node anywhere, no webviews', () => {
    const o = windowOptions('/app/preload.js');
    expect(o.webPreferences).toMatchObject({
      preload: '/app/preload.js', contextIsolation: true, nodeIntegration: false, nodeIntegrationInWorker: false, nodeIntegrationInSubFrames: false,
      sandbox: true, webSecurity: true, allowRunningInsecureContent: false, webviewTag: false, devTools: false,
    });
    expect([o.minWidth, o.minHeight]).toEqual([1280, 800]);
  });
  it('may show only its own pages and request nothing from the network', () => {
    expect(mayNavigate('fenceline://app/index.html')).toBe(true);
    for (const u of ['https://example.org/', 'file:///etc/passwd', 'fenceline://other/x', 'javascript:alert(1)', 'not a url']) expect(mayNavigate(u), u).toBe(false);
    expect(mayRequest('data:image/png;base64,AA')).toBe(true);
    expect(mayRequest('http://127.0.0.1:9/')).toBe(false);
  });
  it('maps app addresses to files inside the renderer folder only', () => {
    expect(rendererFile('fenceline://app/')).toBe('index.html');
    expect(rendererFile('fenceline://app/assets/index-1.js')).toBe('assets/index-1.js');
    // Dot segments are resolved by the URL parser against the root, so they cannot climb out of it…
    expect(rendererFile('fenceline://app/assets/%2e%2e/%2e%2e/x')).toBe('x');
    // …and encoded slashes that would, once decoded, are refused.
    expect(rendererFile('fenceline://app/..%2f..%2fsecret.txt')).toBeNull();
    expect(rendererFile('fenceline://app/a%5cb')).toBeNull();
    expect(rendererFile('https://app/index.html')).toBeNull();
  });
});

describe('the preload refuses methods outside the contract', () => {
  function fakeIpc() {
    const invoked: unknown[][] = [];
    const listeners = new Map<string, Set<(e: unknown, p: unknown) => void>>();
    const ipc: IpcLike = {
      async invoke(channel, ...args) { invoked.push([channel, ...args]); return { ok: true, value: 'from main' }; },
      on(channel, l) { (listeners.get(channel) ?? listeners.set(channel, new Set()).get(channel)!).add(l); },
      removeListener(channel, l) { listeners.get(channel)?.delete(l); },
    };
    return { ipc, invoked, emit: (p: unknown) => { for (const l of listeners.get(IPC_CHANNELS.event) ?? []) l({ sender: 'electron internals' }, p); }, listeners };
  }
  it('answers an unknown method itself, sending nothing to the main process', async () => {
    const f = fakeIpc();
    const bridge = createBridge(f.ipc);
    for (const m of ['fs.readFile', '__proto__', 'study.evaluate ', 42]) {
      const r = await bridge.invoke(m as string, {});
      expect(r.ok).toBe(false);
    }
    expect(f.invoked).toEqual([]);
  });
  it('passes every contract method through with its call id', async () => {
    const f = fakeIpc();
    const bridge = createBridge(f.ipc);
    for (const m of API_METHODS) expect(await bridge.invoke(m, { a: 1 }, 'c1')).toEqual({ ok: true, value: 'from main' });
    expect(f.invoked).toHaveLength(API_METHODS.length);
    expect(f.invoked[0]).toEqual([IPC_CHANNELS.invoke, API_METHODS[0], { a: 1 }, 'c1']);
  });
  it('hands the page plain events only, never Electron\'s event object, and unsubscribes', () => {
    const f = fakeIpc();
    const got: ShellEvent[] = [];
    const stop = createBridge(f.ipc).subscribe((e) => got.push(e));
    f.emit({ kind: 'menu', command: 'go:rule' });
    f.emit({ kind: 'other' });
    f.emit('text');
    expect(got).toEqual([{ kind: 'menu', command: 'go:rule' }]);
    stop();
    expect(f.listeners.get(IPC_CHANNELS.event)?.size).toBe(0);
  });
});

describe('progress reaches the window at most 10 times a second', () => {
  it('sends the first event, holds the rest to one per 100 ms, and always delivers the last', () => {
    let t = 0;
    const timers: Array<{ at: number; f: () => void }> = [];
    const sent: Array<{ t: number; done: number }> = [];
    const th = throttleProgress((p) => sent.push({ t, done: p.done }), 100, () => t, (f, ms) => timers.push({ at: t + ms, f }));
    for (let i = 0; i <= 1000; i++) {
      t = i; // one event per millisecond for one second
      while (timers.length && timers[0]!.at <= t) timers.shift()!.f();
      th.push({ stage: 'propensity', done: i, total: 1000 });
    }
    t = 1100;
    while (timers.length) timers.shift()!.f();
    expect(sent[0]).toEqual({ t: 0, done: 0 });
    expect(sent.at(-1)!.done).toBe(1000);
    for (let i = 1; i < sent.length; i++) expect(sent[i]!.t - sent[i - 1]!.t).toBeGreaterThanOrEqual(100);
    expect(sent.length).toBeLessThanOrEqual(12);
  });
});
