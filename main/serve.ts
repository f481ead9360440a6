// Browser mode: the renderer served on 127.0.0.1 with the api over HTTP. It binds to loopback
// only, and every /api/ request must carry the random token printed once at launch in the
// X-Fenceline-Token header (401 without it, 403 with a wrong one), so no other web page and no
// other local user can call the api. The page is served with a strict Content-Security-Policy.
// No analysis logic lives here: requests become callApi calls (main/api.ts), the long ones on
// worker threads (main/host/worker-runner.ts), with the session's allow-list (main/api/access.ts):
// files reach the api only by upload (UPLOAD_ENDPOINT), stored in the workspace.

import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';
import { createWriteStream, mkdirSync, readFileSync, renameSync, rmSync, statSync } from 'node:fs';
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { homedir } from 'node:os';
import { extname, join, normalize, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import buildConfig from '../electron.config.ts';
import { UPLOAD_ENDPOINT, UPLOAD_MAX_BYTES, UPLOAD_NAME_HEADER, type ApiResult, type UploadedFile } from './contract/api.ts';
import { callApi } from './api.ts';
import { grantUploaded, sessionGrants, uploadsDir, type AccessGrants } from './api/access.ts';
import { JobTable } from './host/jobs.ts';
import { createWorkerRunner } from './host/worker-runner.ts';

export const TOKEN_HEADER = 'x-fenceline-token';
const MAX_BODY_BYTES = 20 * 2 ** 20;
const ROOT = fileURLToPath(new URL('..', import.meta.url));

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8', '.js': 'text/javascript; charset=utf-8', '.css': 'text/css; charset=utf-8',
  '.svg': 'image/svg+xml', '.png': 'image/png', '.woff2': 'font/woff2', '.json': 'application/json', '.ico': 'image/x-icon',
};

export interface ServeOptions {
  port?: number;
  /** Folder of the built renderer (vite build output). */
  rendererDir?: string;
  workspaceDir?: string;
  /** Largest upload accepted (default UPLOAD_MAX_BYTES; smaller in tests). */
  uploadMaxBytes?: number;
  /** Keep a job worker warm for the next long call (worker-runner.ts `warmSpare`): `npm run serve` does; tests leave it off. */
  warmJobWorker?: boolean;
}

export interface RunningServer {
  url: string;
  port: number;
  token: string;
  server: Server;
  close(): Promise<void>;
}

/** The per-user data folder (the Electron shell uses its own user-data folder). */
export function defaultWorkspaceDir(): string {
  if (process.platform === 'win32') return join(process.env.APPDATA ?? join(homedir(), 'AppData', 'Roaming'), 'Fenceline');
  if (process.platform === 'darwin') return join(homedir(), 'Library', 'Application Support', 'Fenceline');
  return join(process.env.XDG_DATA_HOME ?? join(homedir(), '.local', 'share'), 'fenceline');
}

const FAULT: ApiResult<never> = {
  ok: false,
  error: { kind: 'input', problems: [{ path: '', message: 'Something went wrong inside Fenceline. The details were written in the terminal window; please keep them for a bug report.' }] },
};

function securityHeaders(res: ServerResponse): void {
  res.setHeader('Content-Security-Policy', buildConfig.contentSecurityPolicy);
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.setHeader('Referrer-Policy', 'no-referrer');
  res.setHeader('Cross-Origin-Opener-Policy', 'same-origin');
  res.setHeader('Cross-Origin-Resource-Policy', 'same-origin');
  res.setHeader('X-Frame-Options', 'DENY');
  res.setHeader('Cache-Control', 'no-store');
}

function send(res: ServerResponse, status: number, body: unknown): void {
  const text = JSON.stringify(body);
  res.writeHead(status, { 'Content-Type': 'application/json; charset=utf-8', 'Content-Length': Buffer.byteLength(text) });
  res.end(text);
}

const tooLarge = (limit: number) => ({
  ok: false, error: { kind: 'input', problems: [{ path: '', message: `The request is larger than ${Math.round(limit / 2 ** 20)} MB, the most this window accepts.` }] },
});

/**
 * Answer 413 with a plain JSON message and stop reading: the client learns why instead of seeing
 * its connection reset. The rest of the body is read and discarded (up to the socket's close,
 * which `Connection: close` asks for once the answer is out).
 */
function refuseTooLarge(req: IncomingMessage, res: ServerResponse, limit: number): void {
  req.removeAllListeners('data');
  req.resume();
  res.setHeader('Connection', 'close');
  send(res, 413, tooLarge(limit));
}

function readBody(req: IncomingMessage): Promise<unknown> {
  return new Promise((done, fail) => {
    const chunks: Buffer[] = [];
    let size = 0;
    if (Number(req.headers['content-length'] ?? 0) > MAX_BODY_BYTES) { fail(new RangeError('too large')); return; }
    req.on('data', (c: Buffer) => {
      size += c.length;
      if (size > MAX_BODY_BYTES) { fail(new RangeError('too large')); return; }
      chunks.push(c);
    });
    req.on('end', () => {
      try { done(chunks.length ? JSON.parse(Buffer.concat(chunks).toString('utf8')) : {}); } catch { fail(new SyntaxError('not JSON')); }
    });
    req.on('error', fail);
  });
}

function tokenMatches(given: string | string[] | undefined, token: Buffer): boolean {
  if (typeof given !== 'string') return false;
  const b = Buffer.from(given, 'utf8');
  return b.length === token.length && timingSafeEqual(b, token);
}

function serveFile(res: ServerResponse, rendererDir: string, urlPath: string): void {
  let rel: string;
  try { rel = decodeURIComponent(urlPath.split('?')[0]!); } catch { res.writeHead(400).end(); return; }
  if (rel === '/' || rel === '') rel = '/index.html';
  const full = normalize(join(rendererDir, rel));
  if (full !== rendererDir && !full.startsWith(rendererDir + sep)) { res.writeHead(404).end(); return; }
  let body: Buffer;
  try {
    if (!statSync(full).isFile()) throw new Error('not a file');
    body = readFileSync(full);
  } catch {
    if (rel === '/index.html') {
      res.writeHead(503, { 'Content-Type': 'text/plain; charset=utf-8' });
      res.end('The app\'s screens are not built yet. Stop this server, run "npm run build:app", then "npm run serve" again.\n');
      return;
    }
    res.writeHead(404, { 'Content-Type': 'text/plain; charset=utf-8' }).end('Not found.\n');
    return;
  }
  res.writeHead(200, { 'Content-Type': TYPES[extname(full).toLowerCase()] ?? 'application/octet-stream', 'Content-Length': body.length });
  res.end(body);
}

/** A stored file's name: the picked name's last part, letters, digits and a few marks only, no leading dot. */
export function safeFileName(raw: string | string[] | undefined): string {
  let name = '';
  try { name = decodeURIComponent(typeof raw === 'string' ? raw : ''); } catch { name = ''; }
  name = name.split(/[\\/]/).pop() ?? '';
  name = name.replace(/[^\p{L}\p{N} ._()-]/gu, '_').replace(/^[.\s]+/, '').replace(/\s+$/, '').slice(-120);
  return name === '' ? 'upload' : name;
}

/**
 * The browser's way in for a file (contract/api.ts, UPLOAD_ENDPOINT): the raw body is streamed to
 * <workspace>/uploads/<first 16 hex digits of its SHA-256>/<name>, and the stored path joins the
 * session's allow-list. Beyond UPLOAD_MAX_BYTES: 413, and nothing is kept.
 */
function receiveUpload(req: IncomingMessage, res: ServerResponse, workspaceDir: string, access: AccessGrants, limit = UPLOAD_MAX_BYTES): void {
  const name = safeFileName(req.headers[UPLOAD_NAME_HEADER.toLowerCase()]);
  if (Number(req.headers['content-length'] ?? 0) > limit) { refuseTooLarge(req, res, limit); return; }
  const root = uploadsDir(workspaceDir);
  try { mkdirSync(root, { recursive: true }); } catch (e) {
    send(res, 500, { ok: false, error: { kind: 'input', problems: [{ path: '', message: `The workspace folder cannot take the file (${(e as NodeJS.ErrnoException).code ?? 'write error'}).` }] } });
    return;
  }
  const temp = join(root, `.incoming-${randomBytes(8).toString('hex')}.part`);
  const out = createWriteStream(temp, { flags: 'wx' });
  const hash = createHash('sha256');
  let bytes = 0;
  let failed = false;
  const fail = (status: number, body: unknown) => {
    if (failed) return;
    failed = true;
    out.destroy();
    rmSync(temp, { force: true });
    if (status === 413) refuseTooLarge(req, res, limit); else send(res, status, body);
  };
  req.on('data', (c: Buffer) => {
    if (failed) return;
    bytes += c.length;
    if (bytes > limit) { fail(413, null); return; }
    hash.update(c);
    if (!out.write(c)) { req.pause(); out.once('drain', () => req.resume()); }
  });
  req.on('error', () => fail(400, { error: 'The upload was interrupted.' }));
  out.on('error', (e: NodeJS.ErrnoException) => fail(500, { ok: false, error: { kind: 'input', problems: [{ path: '', message: `The file could not be stored in the workspace (${e.code ?? 'write error'}).` }] } }));
  req.on('end', () => {
    if (failed) return;
    out.end(() => {
      if (failed) return;
      const sha256 = hash.digest('hex');
      const dir = join(root, sha256.slice(0, 16));
      const path = join(dir, name);
      try {
        mkdirSync(dir, { recursive: true });
        renameSync(temp, path);
      } catch (e) {
        rmSync(temp, { force: true });
        send(res, 500, { ok: false, error: { kind: 'input', problems: [{ path: '', message: `The file could not be stored in the workspace (${(e as NodeJS.ErrnoException).code ?? 'write error'}).` }] } });
        return;
      }
      grantUploaded(access, path);
      const answer: ApiResult<UploadedFile> = { ok: true, value: { path, name, bytes, sha256 } };
      send(res, 200, answer);
    });
  });
}

export async function startServer(options: ServeOptions = {}): Promise<RunningServer> {
  const tokenText = randomBytes(32).toString('base64url');
  const token = Buffer.from(tokenText, 'utf8');
  const rendererDir = resolve(options.rendererDir ?? join(ROOT, buildConfig.outDir, 'renderer'));
  const workspaceDir = resolve(options.workspaceDir ?? defaultWorkspaceDir());
  // Long methods (imports, the workspace, estimation) run on worker threads, so this loop keeps answering.
  // The session's allow-list (main/api/access.ts): the page names no path it was not given.
  const access = sessionGrants(workspaceDir);
  const host = { host: 'browser' as const, workspaceDir, access, runInWorker: createWorkerRunner({ warmSpare: options.warmJobWorker ?? false }) };
  const fault = (e: unknown): ApiResult<unknown> => { console.error('Fenceline internal fault:', e); return FAULT; };
  const jobs = new JobTable(callApi, host, fault);
  let port = 0;

  const server = createServer((req, res) => {
    securityHeaders(res);
    const url = req.url ?? '/';
    // Only this server's own address: a page elsewhere that rebinds a name to 127.0.0.1 is refused.
    const hostHeader = req.headers.host ?? '';
    if (hostHeader !== `127.0.0.1:${port}` && hostHeader !== `localhost:${port}`) { send(res, 403, { error: 'wrong host' }); return; }
    if (!url.startsWith('/api/')) {
      if (req.method !== 'GET' && req.method !== 'HEAD') { res.writeHead(405).end(); return; }
      serveFile(res, rendererDir, url);
      return;
    }
    const given = req.headers[TOKEN_HEADER];
    if (given === undefined) { send(res, 401, { error: 'This request has no Fenceline token.' }); return; }
    if (!tokenMatches(given, token)) { send(res, 403, { error: 'This request has the wrong Fenceline token.' }); return; }
    const origin = req.headers.origin;
    if (origin !== undefined && origin !== `http://127.0.0.1:${port}` && origin !== `http://localhost:${port}`) { send(res, 403, { error: 'wrong origin' }); return; }
    if (req.method !== 'POST') { send(res, 405, { error: 'Use POST.' }); return; }
    const route = url.split('?')[0]!;
    if (route === UPLOAD_ENDPOINT) { receiveUpload(req, res, workspaceDir, access, options.uploadMaxBytes); return; }
    void handleApi(req, res, route);
  });

  async function handleApi(req: IncomingMessage, res: ServerResponse, path: string): Promise<void> {
    let body: unknown;
    try { body = await readBody(req); } catch (e) {
      if (e instanceof RangeError) refuseTooLarge(req, res, MAX_BODY_BYTES);
      else send(res, 400, { ok: false, error: { kind: 'input', problems: [{ path: '', message: 'The request is not JSON.' }] } });
      return;
    }
    const b = (body ?? {}) as { method?: unknown; args?: unknown };
    if (path === '/api/call') {
      try { send(res, 200, await callApi(b.method, b.args, host)); } catch (e) { send(res, 500, fault(e)); }
      return;
    }
    if (path === '/api/jobs') { send(res, 200, { jobId: jobs.start(b.method, b.args) }); return; }
    const m = /^\/api\/jobs\/([0-9a-f]{24})(\/cancel)?$/.exec(path);
    if (m) {
      const id = m[1]!;
      if (m[2]) { const cancelled = jobs.cancel(id); send(res, cancelled ? 200 : 404, { cancelled }); return; }
      const view = jobs.view(id);
      send(res, view ? 200 : 404, view ?? { error: 'No such job.' });
      return;
    }
    send(res, 404, { error: 'No such api route.' });
  }

  await new Promise<void>((ready, fail) => {
    server.once('error', fail);
    server.listen(options.port ?? 0, '127.0.0.1', () => ready());
  });
  port = (server.address() as AddressInfo).port;
  return {
    url: `http://127.0.0.1:${port}/#token=${tokenText}`,
    port,
    token: tokenText,
    server,
    close: () => new Promise<void>((done) => { jobs.cancelAll(); server.close(() => done()); server.closeAllConnections(); }),
  };
}

function usage(message: string): never {
  console.error(`${message}\nUsage: npm run serve -- [--port N] [--workspace FOLDER]\n  --port N          listen on 127.0.0.1:N (0 or absent: any free port)\n  --workspace DIR   where studies, runs and the workspace file are kept (default: ${defaultWorkspaceDir()})`);
  process.exit(2);
}

async function main(): Promise<void> {
  let values;
  try {
    ({ values } = parseArgs({ options: { port: { type: 'string' }, workspace: { type: 'string' }, renderer: { type: 'string' } }, allowPositionals: false }));
  } catch (e) {
    usage((e as Error).message);
  }
  const port = values.port === undefined ? 0 : Number(values.port);
  if (!Number.isInteger(port) || port < 0 || port > 65535) usage(`--port must be a whole number from 0 to 65535; found "${values.port}".`);
  let running: RunningServer;
  try {
    running = await startServer({ port, warmJobWorker: true, ...(values.workspace ? { workspaceDir: values.workspace } : {}), ...(values.renderer ? { rendererDir: values.renderer } : {}) });
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    console.error(code === 'EADDRINUSE' ? `Port ${port} is in use by another program. Choose another with --port, or --port 0 for any free port.` : `Browser mode could not start (${code ?? (e as Error).message}).`);
    process.exit(1);
  }
  // The one line on stdout: the address to open, token included (in the fragment, which browsers do not send).
  process.stdout.write(`${running.url}\n`);
  console.error('Fenceline browser mode: open the address above in a browser on this computer. Press Ctrl+C to stop.');
  const stop = () => { void running.close().then(() => process.exit(0)); };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) void main();
