// The Electron shell's transport: the preload's invoke, with progress events matched to the call
// by an id and cancellation sent back by the same id.

import type { CallOptions, Transport } from './api-client.ts';
import type { FencelineBridge } from './bridge-types.ts';

let counter = 0;

export function ipcTransport(bridge: FencelineBridge): Transport {
  return {
    async call(method, args, options: CallOptions) {
      const callId = `c${Date.now().toString(36)}-${++counter}`;
      const stop = options.onProgress
        ? bridge.subscribe((e) => { if (e.kind === 'progress' && e.callId === callId && e.progress) options.onProgress!(e.progress); })
        : () => {};
      const cancel = () => void bridge.cancel(callId);
      options.signal?.addEventListener('abort', cancel);
      try {
        return await bridge.invoke(method, args, callId);
      } finally {
        stop();
        options.signal?.removeEventListener('abort', cancel);
      }
    },
  };
}
