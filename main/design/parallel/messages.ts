// Messages between the propensity pool and its workers: plain data and transferred
// Float64Array buffers only (never class instances); workers never touch the database.

import type { ApsSettings } from '../aps.ts';
import type { Program } from '../../rules/types.ts';

export interface WorkerInit {
  type: 'init';
  program: Program;
  scales: number[];
  settings: ApsSettings;
  points: { d: number; replicates: number; perReplicate: number; points: Float64Array };
}

export interface WorkerTask {
  type: 'task';
  id: number;
  n: number;
  continuous: Float64Array[];
  discrete: Float64Array[];
}

export interface WorkerDone {
  type: 'done';
  id: number;
  aps: Float64Array[];
  se: Float64Array[];
  method: Uint8Array[];
  straddle: Uint32Array[];
  refined: Uint8Array[];
}

export interface WorkerFailed {
  type: 'failed';
  id: number;
  message: string;
  stack?: string;
}

export type ToWorker = WorkerInit | WorkerTask;
export type FromWorker = WorkerDone | WorkerFailed;
