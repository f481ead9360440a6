// Browser mode under the probes of the hardening review: files enter only by upload (stored in
// the workspace, then allowed), the page cannot name other paths, oversized bodies get a 413
// with a plain JSON message instead of a reset connection, and long calls share one bounded
// queue that answers "busy" beyond its length.

import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UPLOAD_ENDPOINT, UPLOAD_NAME_HEADER, type ApiResult } from '../../main/contract/api.ts';
import { safeFileName, startServer, type RunningServer } from '../../main/serve.ts';
import { busyMessage, createWorkerRunner } from '../../main/host/worker-runner.ts';
import { writeSingleFileStudy } from './single-file-study.ts';

let srv: RunningServer;
let base: string;
let dir: string;
const UPLOAD_LIMIT = 256 * 1024;
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'fenceline-harden-'));
  writeSingleFileStudy(dir, 300);
  writeFileSync(join(dir, 'secret.json'), '{"secret":"sEcReT"}');
  srv = await startServer({ port: 0, rendererDir: join(dir, 'renderer'), workspaceDir: join(dir, 'ws'), uploadMaxBytes: UPLOAD_LIMIT });
  base = `http://127.0.0.1:${srv.port}`;
});
afterAll(async () => { await srv.close(); });

const token = () => ({ 'X-Fenceline-Token': srv.token });
const apiCall = async (method: string, args: unknown) =>
  (await (await fetch(`${base}/api/call`, { method: 'POST', body: JSON.stringify({ method, args }), headers: token() })).json()) as ApiResult<unknown>;
const upload = (body: Uint8Array | string, name: string, headers: Record<string, string> = token()) =>
  fetch(`${base}${UPLOAD_ENDPOINT}`, { method: 'POST', body, headers: { ...headers, [UPLOAD_NAME_HEADER]: encodeURIComponent(name) } });

/** A request whose body is sent in chunks without a length (the server cannot refuse it from the header). */
function chunked(path: string, size: number, headers: Record<string, string>): Promise<{ status: number; body: string }> {
  return new Promise((done, fail) => {
    const req = request({ host: '127.0.0.1', port: srv.port, path, method: 'POST', headers: { ...headers, 'Transfer-Encoding': 'chunked' } }, (res) => {
      let body = '';
      res.on('data', (c) => { body += c; });
      res.on('end', () => done({ status: res.statusCode ?? 0, body }));
    });
    req.on('error', fail);
    const chunk = Buffer.alloc(64 * 1024, 0x61);
    let sent = 0;
    const pump = () => {
      while (sent < size) {
        sent += chunk.length;
        if (!req.write(chunk)) { req.once('drain', pump); return; }
      }
      req.end();
    };
    pump();
  });
}

describe('uploads (the browser\'s way in for a file)', () => {
  it('stores the bytes under uploads/<sha256 prefix>/<name>, answers the contract, and then the file may be read', async () => {
    const bytes = readFileSync(join(dir, 'applicants.csv'));
    const r = await upload(bytes, 'applicants.csv');
    expect(r.status).toBe(200);
    const a = (await r.json()) as ApiResult<{ path: string; name: string; bytes: number; sha256: string }>;
    if (!a.ok) throw new Error(JSON.stringify(a));
    const sha = createHash('sha256').update(bytes).digest('hex');
    expect(a.value).toEqual({ path: join(dir, 'ws', 'uploads', sha.slice(0, 16), 'applicants.csv'), name: 'applicants.csv', bytes: bytes.length, sha256: sha });
    expect(readFileSync(a.value.path).equals(bytes)).toBe(true);
    expect(await apiCall('data.preview', { path: a.value.path })).toMatchObject({ ok: true, value: { rowCount: 300 } });
  });
  it('needs the token, and refuses another origin', async () => {
    expect((await upload('x', 'a.csv', {})).status).toBe(401);
    expect((await upload('x', 'a.csv', { ...token(), Origin: 'http://evil.example' })).status).toBe(403);
  });
  it('keeps only a safe last part of the name', () => {
    expect(safeFileName(encodeURIComponent('../../etc/passwd'))).toBe('passwd');
    expect(safeFileName(encodeURIComponent('..\\..\\x.csv'))).toBe('x.csv');
    expect(safeFileName(encodeURIComponent('.bashrc'))).toBe('bashrc');
    expect(safeFileName(encodeURIComponent('a<b>|c.csv'))).toBe('a_b__c.csv');
    expect(safeFileName(undefined)).toBe('upload');
    expect(safeFileName('%E0%A4%A')).toBe('upload');
  });
  it('answers 413 with a plain JSON message beyond the limit and keeps nothing', async () => {
    const r = await upload(new Uint8Array(UPLOAD_LIMIT + 1), 'big.csv');
    expect(r.status).toBe(413);
    expect(await r.json()).toMatchObject({ ok: false, error: { problems: [{ message: expect.stringMatching(/larger than/) }] } });
    const c = await chunked(UPLOAD_ENDPOINT, UPLOAD_LIMIT * 2, token());
    expect(c.status).toBe(413);
    expect(JSON.parse(c.body)).toMatchObject({ ok: false });
    const left = readdirSync(join(dir, 'ws', 'uploads'));
    expect(left.filter((n) => n.endsWith('.part'))).toEqual([]);
  });
});

describe('the page names no other path', () => {
  it('cannot open, list, check or write outside the session', async () => {
    for (const [m, a] of [
      ['study.open', { path: join(dir, 'secret.json') }],
      ['files.list', { dir: '/', kind: 'study' }],
      ['study.check', { studyPath: join(dir, 'study.json') }],
      ['study.save', { path: join(dir, 'secret.json'), study: {} }],
      ['memo.preview', { path: join(dir, 'memo.html') }],
    ] as const) {
      const r = await apiCall(m, a);
      expect(r.ok, m).toBe(false);
      expect(JSON.stringify(r)).not.toContain('sEcReT');
    }
    expect(readFileSync(join(dir, 'secret.json'), 'utf8')).toContain('sEcReT');
  });
});

describe('oversized /api/call bodies', () => {
  it('answer 413 with a JSON message, with or without a length header', async () => {
    const big = JSON.stringify({ method: 'samples.list', args: { pad: 'x'.repeat(21 * 2 ** 20) } });
    const r = await fetch(`${base}/api/call`, { method: 'POST', body: big, headers: token() });
    expect(r.status).toBe(413);
    expect(await r.json()).toMatchObject({ ok: false, error: { kind: 'input', problems: [{ message: expect.stringMatching(/larger than 20 MB/) }] } });
    const c = await chunked('/api/call', 21 * 2 ** 20, token());
    expect(c.status).toBe(413);
  });
});

describe('one queue for long calls', () => {
  it('runs at most maxRunning job workers, queues maxWaiting calls, and answers the next one "busy"', async () => {
    const stuck = createWorkerRunner({ workerUrl: new URL('./fixtures/stuck-job-worker.mjs', import.meta.url), cancelGraceMs: 100, maxRunning: 1, maxWaiting: 2 });
    const controllers = [0, 1, 2].map(() => new AbortController());
    const calls = controllers.map((c) => stuck('data.preview', { path: 'x' }, { signal: c.signal }));
    const busy = await stuck('data.preview', { path: 'x' }, {});
    expect(busy).toEqual({ ok: false, error: { kind: 'input', problems: [{ path: '', message: busyMessage(2) }] } });
    expect(busyMessage(2)).toBe('Fenceline is busy — 2 calls are waiting; try again when the current run finishes.');
    // A waiting call cancelled leaves the queue at once; the running one is stopped by force.
    controllers[2]!.abort();
    expect(await calls[2]).toMatchObject({ ok: false, error: { kind: 'cancelled' } });
    controllers[0]!.abort();
    expect(await calls[0]).toMatchObject({ ok: false, error: { kind: 'cancelled' } });
    // The second call got the freed place and runs now (it is stuck too).
    controllers[1]!.abort();
    expect(await calls[1]).toMatchObject({ ok: false, error: { kind: 'cancelled' } });
  });
});

it('no upload temp file is left behind', () => {
  expect(existsSync(join(dir, 'ws', 'uploads')) ? readdirSync(join(dir, 'ws', 'uploads')).filter((n) => n.startsWith('.incoming')) : []).toEqual([]);
});
