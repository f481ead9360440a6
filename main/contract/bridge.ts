// What the Electron preload exposes to the renderer on `window.fenceline` (main/electron/
// preload.ts builds it; app/lib/ipc-transport.ts uses it). Types and channel names only.

import type { ApiResult, ProgressEvent } from './api.ts';

export interface ShellEvent {
  kind: 'progress' | 'menu';
  /** The call a progress event belongs to. */
  callId?: string;
  progress?: ProgressEvent;
  /** A menu command: 'go:<step>' or 'open-study:<path>'. */
  command?: string;
}

export interface FencelineBridge {
  /** Call an api method; methods outside the contract are refused before anything is sent. */
  invoke(method: string, args: unknown, callId?: string): Promise<ApiResult<unknown>>;
  /** Stop the long call with this id (its answer is then "cancelled"). */
  cancel(callId: string): Promise<void>;
  /** Follow progress and menu commands; returns the function that ends the subscription. */
  subscribe(listener: (event: ShellEvent) => void): () => void;
}

export const IPC_CHANNELS = { invoke: 'fenceline:invoke', cancel: 'fenceline:cancel', event: 'fenceline:event' } as const;
