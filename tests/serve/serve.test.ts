// Browser mode's guard (main/serve.ts): loopback only, the per-launch token in a header on every
// /api/ request (401 without, 403 wrong), a strict Content-Security-Policy on the page, no files
// outside the renderer folder, and long calls as jobs that can be polled and cancelled.

import { mkdtempSync, mkdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { request } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type RunningServer } from '../../main/serve.ts';

let srv: RunningServer;
let base: string;
beforeAll(async () => {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-serve-'));
  mkdirSync(join(dir, 'renderer', 'assets'), { recursive: true });
  writeFileSync(join(dir, 'renderer', 'index.html'), '<!doctype html><title>t</title>');
  writeFileSync(join(dir, 'renderer', 'assets', 'a.js'), 'export {};');
  writeFileSync(join(dir, 'secret.txt'), 'not for the page');
  srv = await startServer({ port: 0, rendererDir: join(dir, 'renderer'), workspaceDir: join(dir, 'ws') });
  base = `http://127.0.0.1:${srv.port}`;
});
afterAll(async () => { await srv.close(); });

const call = (path: string, body: unknown, headers: Record<string, string> = {}) =>
  fetch(`${base}${path}`, { method: 'POST', body: JSON.stringify(body), headers: { 'Content-Type': 'application/json', ...headers } });
const withToken = () => ({ 'X-Fenceline-Token': srv.token });

describe('the address and the token', () => {
  it('prints a loopback address carrying a long random token in the fragment', () => {
    expect(srv.url).toMatch(new RegExp(`^http://127\\.0\\.0\\.1:${srv.port}/#token=[A-Za-z0-9_-]{43}$`));
    expect(srv.server.address()).toMatchObject({ address: '127.0.0.1' });
  });
  it('answers 401 without a token and 403 with a wrong one, before reading the call', async () => {
    expect((await call('/api/call', { method: 'samples.list', args: {} })).status).toBe(401);
    expect((await call('/api/call', { method: 'samples.list', args: {} }, { 'X-Fenceline-Token': srv.token.slice(0, -1) + 'x' })).status).toBe(403);
    expect((await call('/api/jobs', { method: 'samples.list', args: {} })).status).toBe(401);
    expect((await call(`/api/call?token=${srv.token}`, { method: 'samples.list', args: {} })).status).toBe(401);
    const r = await call('/api/call', { method: 'samples.list', args: {} }, withToken());
    expect(r.status).toBe(200);
    expect(await r.json()).toMatchObject({ ok: true });
  });
  it('refuses another origin and another Host name even with the token', async () => {
    expect((await call('/api/call', { method: 'samples.list', args: {} }, { ...withToken(), Origin: 'http://evil.example' })).status).toBe(403);
    const status = await new Promise<number>((done) => {
      const req = request({ host: '127.0.0.1', port: srv.port, path: '/api/call', method: 'POST', headers: { Host: 'rebound.example', 'X-Fenceline-Token': srv.token } }, (res) => { res.resume(); done(res.statusCode ?? 0); });
      req.end('{}');
    });
    expect(status).toBe(403);
  });
  it('refuses methods outside the contract with a plain answer', async () => {
    const r = await call('/api/call', { method: 'fs.readFile', args: { path: '/etc/passwd' } }, withToken());
    expect(await r.json()).toMatchObject({ ok: false, error: { problems: [{ message: expect.stringMatching(/not a Fenceline api method/) }] } });
  });
});

describe('the page', () => {
  it('is served with a CSP that allows only its own scripts, styles and connections', async () => {
    const r = await fetch(`${base}/`);
    expect(r.status).toBe(200);
    const csp = r.headers.get('content-security-policy')!;
    expect(csp).toContain("default-src 'none'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("connect-src 'self'");
    expect(csp).not.toMatch(/unsafe|\*|https?:/);
    expect(r.headers.get('x-content-type-options')).toBe('nosniff');
    expect((await fetch(`${base}/assets/a.js`)).headers.get('content-type')).toMatch(/javascript/);
  });
  it('never serves a file outside the renderer folder', async () => {
    for (const p of ['/../secret.txt', '/%2e%2e/secret.txt', '/assets/..%2f..%2fsecret.txt']) {
      const r = await fetch(`${base}${p}`);
      expect(r.status, p).toBe(404);
    }
  });
});

describe('long calls as jobs', () => {
  it('starts a job, polls it to its answer, and knows no job it did not start', async () => {
    const { jobId } = (await (await call('/api/jobs', { method: 'samples.list', args: {} }, withToken())).json()) as { jobId: string };
    expect(jobId).toMatch(/^[0-9a-f]{24}$/);
    let view: { state: string; result?: { ok: boolean } } = { state: 'running' };
    for (let i = 0; i < 50 && view.state !== 'done'; i++) {
      view = (await (await call(`/api/jobs/${jobId}`, {}, withToken())).json()) as typeof view;
      if (view.state !== 'done') await new Promise((r) => setTimeout(r, 20));
    }
    expect(view).toMatchObject({ state: 'done', result: { ok: true } });
    expect((await call(`/api/jobs/${'0'.repeat(24)}`, {}, withToken())).status).toBe(404);
    expect((await call(`/api/jobs/${'0'.repeat(24)}/cancel`, {}, withToken())).status).toBe(404);
  });
});
