// The renderer's entry: choose the transport (the Electron preload's bridge, else HTTP with the
// token handed over in the address's fragment), then show the app.

import { mount } from 'svelte';
import App from './App.svelte';
import { createApiClient, type Transport } from './lib/api-client.ts';
import type { FencelineBridge } from './lib/bridge-types.ts';
import { httpTransport } from './lib/http-transport.ts';
import { ipcTransport } from './lib/ipc-transport.ts';
import { AppState } from './lib/state.svelte.ts';
import './styles.css';

const TOKEN_KEY = 'fenceline-token';

function browserToken(): string | null {
  const m = /(?:^#|&)token=([A-Za-z0-9_-]+)/.exec(location.hash);
  if (m) {
    sessionStorage.setItem(TOKEN_KEY, m[1]!);
    // Keep the token out of the address bar (and out of anything copied from it).
    history.replaceState(null, '', location.pathname);
    return m[1]!;
  }
  return sessionStorage.getItem(TOKEN_KEY);
}

const bridge = (window as unknown as { fenceline?: FencelineBridge }).fenceline;
let transport: Transport | null = null;
if (bridge) transport = ipcTransport(bridge);
else {
  const token = browserToken();
  if (token) transport = httpTransport(token, (url, init) => fetch(url, { ...init, credentials: 'omit', cache: 'no-store' }));
}

const target = document.getElementById('app')!;
if (transport) {
  const state = new AppState(createApiClient(transport));
  mount(App, { target, props: { app: state, bridge: bridge ?? null } });
} else {
  const p = document.createElement('p');
  p.className = 'fatal';
  p.textContent = 'This page was opened without its access key. Open the full address that "npm run serve" (or "npm start") printed in the terminal, including the part after #.';
  target.append(p);
}
