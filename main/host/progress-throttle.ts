// How often progress reaches a caller: at most one event per interval (100 ms: 10 a second),
// keeping the latest and delivering it a little later, so a bar ends where the work ended and a
// fast loop never floods a window, a poller or a message port. Used by the job workers, the job
// table of browser mode and the Electron shell.

import type { ProgressEvent } from '../contract/api.ts';

export interface ProgressThrottle {
  push(p: ProgressEvent): void;
  /** Send a pending event now (call it when the work ends). */
  flush(): void;
}

export function throttleProgress(send: (p: ProgressEvent) => void, intervalMs = 100, now: () => number = Date.now,
  schedule: (f: () => void, ms: number) => unknown = setTimeout): ProgressThrottle {
  let last = -Infinity;
  let pending: ProgressEvent | null = null;
  let timer = false;
  const fire = () => {
    timer = false;
    if (pending) { last = now(); const p = pending; pending = null; send(p); }
  };
  return {
    push(p) {
      const t = now();
      if (t - last >= intervalMs && !timer) { last = t; pending = null; send(p); return; }
      pending = p;
      if (!timer) { timer = true; schedule(fire, Math.max(0, intervalMs - (t - last))); }
    },
    flush() { if (pending) fire(); },
  };
}
