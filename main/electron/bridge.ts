// The object the preload exposes on window.fenceline, built over any IPC-like object so it can
// be tested without Electron. It refuses methods outside the contract before anything crosses
// to the main process (which checks again, with each method's argument shape).

import type { ApiResult } from '../contract/api.ts';
import { IPC_CHANNELS, type FencelineBridge, type ShellEvent } from '../contract/bridge.ts';
import { isContractMethod, refusedMethod } from './policy.ts';

export interface IpcLike {
  invoke(channel: string, ...args: unknown[]): Promise<unknown>;
  on(channel: string, listener: (event: unknown, payload: unknown) => void): unknown;
  removeListener(channel: string, listener: (event: unknown, payload: unknown) => void): unknown;
}

const isShellEvent = (v: unknown): v is ShellEvent =>
  v !== null && typeof v === 'object' && ((v as ShellEvent).kind === 'progress' || (v as ShellEvent).kind === 'menu');

export function createBridge(ipc: IpcLike): FencelineBridge {
  return {
    async invoke(method, args, callId) {
      if (!isContractMethod(method)) return refusedMethod(method);
      return (await ipc.invoke(IPC_CHANNELS.invoke, method, args, typeof callId === 'string' ? callId : null)) as ApiResult<unknown>;
    },
    async cancel(callId) {
      if (typeof callId === 'string') await ipc.invoke(IPC_CHANNELS.cancel, callId);
    },
    subscribe(listener) {
      // Only the event's plain fields reach the page, never Electron's event object.
      const wrapped = (_event: unknown, payload: unknown) => { if (isShellEvent(payload)) listener(payload); };
      ipc.on(IPC_CHANNELS.event, wrapped);
      return () => { ipc.removeListener(IPC_CHANNELS.event, wrapped); };
    },
  };
}
