// A job worker: runs one long api call (import, workspace, estimation) on its own thread so the
// host's event loop stays free. The call goes through callApi again — the same checks, the same
// methods — but without a worker runner in its context, so it runs here. A cancel message
// aborts the call's AbortController; the host terminates the thread if the work does not stop.
// A worker started ahead of its call ("warm", worker-runner.ts) first renders a small document in
// every memo format (report/warm-up.ts) while it waits, so its call's memo starts warm; the call
// stops the warm-up at its next step.

import { parentPort, workerData } from 'node:worker_threads';
import { callApi } from '../api.ts';
import { AVAILABLE_MEMO_FORMATS } from '../report/memo-names.ts';
import { warmMemoRenderers } from '../report/warm-up.ts';
import type { FromJobWorker, ToJobWorker } from './job-messages.ts';
import { throttleProgress } from './progress-throttle.ts';

const port = parentPort!;
const controller = new AbortController();
const post = (m: FromJobWorker) => port.postMessage(m);
let started = false;

if ((workerData as { warm?: boolean } | null)?.warm) {
  warmMemoRenderers(AVAILABLE_MEMO_FORMATS, () => started).catch((e: unknown) => {
    // The call to come renders from scratch as any cold worker does; the fault is worth a line in the log.
    console.error('Fenceline: warming up the memo renderers failed:', e);
  });
}

port.on('message', (msg: ToJobWorker) => {
  if (msg.type === 'cancel') { controller.abort(); return; }
  if (started) return; // one call per worker
  started = true;
  const progress = throttleProgress((p) => post({ type: 'progress', progress: { stage: p.stage, done: p.done, total: p.total } }));
  callApi(msg.method, msg.args, { ...msg.host, signal: controller.signal, onProgress: (p) => progress.push(p) })
    .then((result) => { progress.flush(); post({ type: 'answer', result }); })
    .catch((e: unknown) => {
      progress.flush();
      const err = e instanceof Error ? e : new Error(String(e));
      post({ type: 'fault', message: err.message, ...(err.stack ? { stack: err.stack } : {}) });
    });
  // The host terminates this thread once it has the answer.
});
