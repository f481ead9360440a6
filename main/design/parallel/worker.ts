// Worker thread of the propensity pool: compiles the program once, then computes blocks.

import { parentPort } from 'node:worker_threads';
import { lowerValidatedProgram } from '../../rules/compile.ts';
import type { CompiledProgram } from '../../rules/ir.ts';
import { computeApsBlock } from '../aps.ts';
import type { FromWorker, ToWorker, WorkerInit } from './messages.ts';

let init: WorkerInit | null = null;
let program: CompiledProgram | null = null;

parentPort!.on('message', (msg: ToWorker) => {
  if (msg.type === 'init') {
    init = msg;
    program = lowerValidatedProgram(msg.program);
    return;
  }
  try {
    if (!init || !program) throw new Error('worker received a task before its program');
    const out = computeApsBlock(program, { n: msg.n, continuous: msg.continuous, discrete: msg.discrete }, init.scales, init.settings, init.points);
    const reply: FromWorker = { type: 'done', id: msg.id, aps: out.aps, se: out.se, method: out.method, straddle: out.straddle, refined: out.refined };
    parentPort!.postMessage(reply, [...out.aps, ...out.se, ...out.method, ...out.straddle, ...out.refined].map((a) => a.buffer as ArrayBuffer));
  } catch (e) {
    const err = e as Error;
    const reply: FromWorker = { type: 'failed', id: msg.id, message: err.message, stack: err.stack };
    parentPort!.postMessage(reply);
  }
});
