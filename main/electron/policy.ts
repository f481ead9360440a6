// The Electron shell's security decisions as plain values and functions, so they can be tested
// without the Electron runtime: the window's web preferences, which methods the renderer may
// call, where it may navigate, and how often progress reaches it.

import { API_METHODS, type ApiMethod, type ApiResult } from '../contract/api.ts';

/** The renderer is served from this privileged scheme (never file:// and never the network). */
export const APP_SCHEME = 'fenceline';
export const APP_ORIGIN = `${APP_SCHEME}://app`;
export const APP_ENTRY = `${APP_ORIGIN}/index.html`;

export interface WindowPolicy {
  width: number;
  height: number;
  minWidth: number;
  minHeight: number;
  title: string;
  show: boolean;
  backgroundColor: string;
  webPreferences: {
    preload: string;
    contextIsolation: true;
    nodeIntegration: false;
    nodeIntegrationInWorker: false;
    nodeIntegrationInSubFrames: false;
    sandbox: true;
    webSecurity: true;
    allowRunningInsecureContent: false;
    webviewTag: false;
    navigateOnDragDrop: false;
    spellcheck: false;
    devTools: boolean;
  };
}

/** Options of the one window: isolated, sandboxed, no Node in the page. 1280×800 is the smallest size the screens are laid out for. */
export function windowOptions(preloadPath: string, devTools = false): WindowPolicy {
  return {
    width: 1400, height: 900, minWidth: 1280, minHeight: 800, title: 'Fenceline', show: false, backgroundColor: '#fbfaf7',
    webPreferences: {
      preload: preloadPath,
      contextIsolation: true, nodeIntegration: false, nodeIntegrationInWorker: false, nodeIntegrationInSubFrames: false,
      sandbox: true, webSecurity: true, allowRunningInsecureContent: false, webviewTag: false, navigateOnDragDrop: false, spellcheck: false,
      devTools,
    },
  };
}

export function isContractMethod(method: unknown): method is ApiMethod {
  return typeof method === 'string' && (API_METHODS as readonly string[]).includes(method);
}

export function refusedMethod(method: unknown): ApiResult<never> {
  return { ok: false, error: { kind: 'input', problems: [{ path: 'method', message: `"${String(method)}" is not a Fenceline api method; the window may call only the methods of the contract.` }] } };
}

/** The renderer may show its own pages only: same scheme and host, nothing else (no http, no file). */
export function mayNavigate(url: string): boolean {
  try {
    const u = new URL(url);
    return u.protocol === `${APP_SCHEME}:` && u.host === 'app';
  } catch {
    return false;
  }
}

/** Requests the window may make at all: its own scheme and inline images; everything else (the network) is cancelled. */
export function mayRequest(url: string): boolean {
  return mayNavigate(url) || url.startsWith('data:') || url.startsWith('devtools:');
}

/** A path inside the renderer folder for a request to the app scheme, or null (outside it, or malformed). */
export function rendererFile(url: string): string | null {
  if (!mayNavigate(url)) return null;
  let path: string;
  try { path = decodeURIComponent(new URL(url).pathname); } catch { return null; }
  if (path === '/' || path === '') path = '/index.html';
  const parts = path.split('/').filter((p) => p !== '');
  if (parts.some((p) => p === '..' || p === '.' || p.includes('\\') || p.includes('\0'))) return null;
  return parts.join('/');
}

// The progress throttle is shared with the job workers (main/host/progress-throttle.ts).
export { throttleProgress } from '../host/progress-throttle.ts';
