// The Electron shell: one window, an application menu, native open/save dialogs, the workspace
// in the user-data folder, and the api over IPC. Thin: every call goes to callApi (main/api.ts),
// which checks the method and its arguments again (the renderer is untrusted).
// Security: contextIsolation, no Node in the page, sandbox (policy.ts); the page is served from
// the fenceline:// scheme with the Content-Security-Policy of electron.config.ts; navigation,
// new windows, webviews and permission requests are refused; every request that is not the app's
// own scheme is cancelled, so the window never reaches the network.

import { app, BrowserWindow, dialog, ipcMain, Menu, protocol, session, type IpcMainInvokeEvent, type MenuItemConstructorOptions } from 'electron';
import { readFile } from 'node:fs/promises';
import { dirname, extname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import buildConfig from '../../electron.config.ts';
import type { DialogArgs } from '../contract/api.ts';
import { IPC_CHANNELS, type ShellEvent } from '../contract/bridge.ts';
import { callApi } from '../api.ts';
import { grantPicked, sessionGrants, type AccessGrants } from '../api/access.ts';
import type { HostDialogs } from '../api/host.ts';
import { createWorkerRunner } from '../host/worker-runner.ts';
import { APP_ENTRY, APP_SCHEME, isContractMethod, mayNavigate, mayRequest, refusedMethod, rendererFile, throttleProgress, windowOptions } from './policy.ts';

const here = dirname(fileURLToPath(import.meta.url));
const rendererDir = join(here, 'renderer');
const TYPES: Record<string, string> = { '.html': 'text/html', '.js': 'text/javascript', '.css': 'text/css', '.png': 'image/png', '.svg': 'image/svg+xml', '.woff2': 'font/woff2' };
const STEPS = ['start', 'rule', 'data', 'run', 'evidence', 'map', 'memo'] as const;

protocol.registerSchemesAsPrivileged([{ scheme: APP_SCHEME, privileges: { standard: true, secure: true, supportFetchAPI: false, corsEnabled: false } }]);

let window: BrowserWindow | null = null;
const calls = new Map<string, AbortController>();
// Long methods run on worker threads (dist/job-worker.js beside this bundle), never on this thread.
// one job worker kept warm for the next run's memo (worker-runner.ts)
const runInWorker = createWorkerRunner({ warmSpare: true });
// The session's allow-list (main/api/access.ts): files the user picked in a dialog, and the workspace's own folders.
let access: AccessGrants | null = null;

function send(event: ShellEvent): void {
  window?.webContents.send(IPC_CHANNELS.event, event);
}

const FILTERS: Record<DialogArgs['purpose'], Electron.FileFilter[]> = {
  study: [{ name: 'Fenceline study', extensions: ['json'] }],
  data: [{ name: 'Workbook or CSV', extensions: ['xlsx', 'xlsm', 'csv', 'txt'] }],
};

const dialogs: HostDialogs = {
  async openFile(args) {
    if (!window) return null;
    const r = await dialog.showOpenDialog(window, { properties: ['openFile'], filters: FILTERS[args.purpose], ...(args.defaultPath ? { defaultPath: args.defaultPath } : {}) });
    return r.canceled ? null : (r.filePaths[0] ?? null);
  },
  async saveFile(args) {
    if (!window) return null;
    const r = await dialog.showSaveDialog(window, { filters: FILTERS[args.purpose], ...(args.defaultPath ? { defaultPath: args.defaultPath } : {}) });
    return r.canceled ? null : (r.filePath ?? null);
  },
};

/** Only the app's own page may call the api (not a frame, not another origin). */
function fromOurPage(e: IpcMainInvokeEvent): boolean {
  return window !== null && e.sender === window.webContents && e.senderFrame !== null && mayNavigate(e.senderFrame.url);
}

function wireIpc(workspaceDir: string): void {
  ipcMain.handle(IPC_CHANNELS.invoke, async (e, method: unknown, args: unknown, callId: unknown) => {
    if (!fromOurPage(e)) return refusedMethod(method);
    if (!isContractMethod(method)) return refusedMethod(method);
    const id = typeof callId === 'string' && /^[\w-]{1,64}$/.test(callId) ? callId : null;
    const controller = new AbortController();
    if (id) calls.set(id, controller);
    const progress = throttleProgress((p) => { if (id) send({ kind: 'progress', callId: id, progress: p }); });
    try {
      return await callApi(method, args, { host: 'electron', workspaceDir, dialogs, runInWorker, ...(access ? { access } : {}), signal: controller.signal, onProgress: (p) => progress.push(p) });
    } catch (err) {
      console.error('Fenceline internal fault:', err);
      return { ok: false, error: { kind: 'input', problems: [{ path: '', message: 'Something went wrong inside Fenceline. Please keep the log for a bug report.' }] } };
    } finally {
      progress.flush();
      if (id) calls.delete(id);
    }
  });
  ipcMain.handle(IPC_CHANNELS.cancel, (e, callId: unknown) => {
    if (fromOurPage(e) && typeof callId === 'string') calls.get(callId)?.abort();
  });
}

function buildMenu(): Menu {
  const go = STEPS.map((s, i): MenuItemConstructorOptions => ({ label: s[0]!.toUpperCase() + s.slice(1), accelerator: `CmdOrCtrl+${i + 1}`, click: () => send({ kind: 'menu', command: `go:${s}` }) }));
  const template: MenuItemConstructorOptions[] = [
    {
      label: 'File',
      submenu: [
        {
          label: 'Open study…', accelerator: 'CmdOrCtrl+O',
          click: async () => {
            const p = await dialogs.openFile({ purpose: 'study' });
            if (!p) return;
            if (access) grantPicked(access, p, 'study');
            send({ kind: 'menu', command: `open-study:${p}` });
          },
        },
        { label: 'Save study…', accelerator: 'CmdOrCtrl+S', click: () => send({ kind: 'menu', command: 'save-study' }) },
        { type: 'separator' },
        { role: 'quit' },
      ],
    },
    { label: 'Edit', submenu: [{ role: 'undo' }, { role: 'redo' }, { type: 'separator' }, { role: 'cut' }, { role: 'copy' }, { role: 'paste' }, { role: 'selectAll' }] },
    { label: 'Go', submenu: go },
    { label: 'View', submenu: [{ role: 'resetZoom' }, { role: 'zoomIn' }, { role: 'zoomOut' }, { type: 'separator' }, { role: 'togglefullscreen' }] },
    { label: 'Help', submenu: [{ label: `About Fenceline ${app.getVersion()}`, click: () => void dialog.showMessageBox({ message: `Fenceline ${app.getVersion()}`, detail: 'Offline evaluation of programs whose eligibility is set by a formula.' }) }] },
  ];
  return Menu.buildFromTemplate(template);
}

function lockDown(): void {
  const s = session.defaultSession;
  s.setPermissionRequestHandler((_wc, _permission, answer) => answer(false));
  s.setPermissionCheckHandler(() => false);
  s.webRequest.onBeforeRequest((details, answer) => answer({ cancel: !mayRequest(details.url) }));
  app.on('web-contents-created', (_e, contents) => {
    contents.on('will-navigate', (ev, url) => { if (!mayNavigate(url)) ev.preventDefault(); });
    contents.on('will-redirect', (ev, url) => { if (!mayNavigate(url)) ev.preventDefault(); });
    contents.on('will-attach-webview', (ev) => ev.preventDefault());
    contents.setWindowOpenHandler(() => ({ action: 'deny' }));
  });
  protocol.handle(APP_SCHEME, async (request) => {
    const rel = rendererFile(request.url);
    if (rel === null) return new Response('Not found', { status: 404 });
    try {
      const body = await readFile(join(rendererDir, rel));
      return new Response(body, {
        headers: {
          'Content-Type': TYPES[extname(rel).toLowerCase()] ?? 'application/octet-stream',
          'Content-Security-Policy': buildConfig.contentSecurityPolicy,
          'X-Content-Type-Options': 'nosniff',
        },
      });
    } catch {
      return new Response('Not found', { status: 404 });
    }
  });
}

async function start(): Promise<void> {
  await app.whenReady();
  const workspaceDir = join(app.getPath('userData'), 'workspace');
  access = sessionGrants(workspaceDir);
  lockDown();
  wireIpc(workspaceDir);
  Menu.setApplicationMenu(buildMenu());
  window = new BrowserWindow(windowOptions(join(here, 'preload.js'), !app.isPackaged));
  window.once('ready-to-show', () => window?.show());
  window.on('closed', () => { for (const c of calls.values()) c.abort(); window = null; });
  // Closing with edits not saved in a study file: the page's beforeunload holds the close, and
  // the analyst chooses (the edits are also kept in the workspace and come back at the next start).
  window.webContents.on('will-prevent-unload', (event) => {
    const choice = dialog.showMessageBoxSync(window!, {
      type: 'question',
      buttons: ['Close anyway', 'Stay'],
      defaultId: 1,
      cancelId: 1,
      message: 'The open study has changes that are not saved in a study file.',
      detail: 'They are kept in the workspace and come back when you open Fenceline again; to keep a file of them, stay and choose Save.',
    });
    if (choice === 0) event.preventDefault(); // let the window close
  });
  await window.loadURL(APP_ENTRY);
}

app.on('window-all-closed', () => app.quit());
if (!app.requestSingleInstanceLock()) app.quit();
else void start();
