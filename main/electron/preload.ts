// The preload (sandboxed, contextIsolation on): one object on window.fenceline with invoke,
// cancel and a subscription to progress and menu events. Nothing else of Electron or Node
// reaches the page. Bundled into dist/preload.js (electron.config.ts).

import { contextBridge, ipcRenderer } from 'electron';
import { createBridge } from './bridge.ts';

contextBridge.exposeInMainWorld('fenceline', createBridge(ipcRenderer));
