// The one typed API surface (main/api.ts implements it). The CLI calls it in-process, browser
// mode over HTTP, Electron over IPC. Types only.

import type { Results } from './results.ts';
import type { StudySettings } from './study.ts';
import type { Problem } from '../rules/types.ts';

export type OutputFormat = 'pdf' | 'html' | 'docx' | 'xlsx';
export const OUTPUT_FORMATS: readonly OutputFormat[] = ['pdf', 'html', 'docx', 'xlsx'];

export interface ProgressEvent { stage: string; done: number; total: number }

/** An answer, or why there is none: the input is wrong (problems say where), or the work was cancelled. */
export type ApiResult<T> =
  | { ok: true; value: T }
  | { ok: false; error: { kind: 'input' | 'cancelled'; problems: Problem[] } };

export interface SettingsOverrides extends Partial<Pick<StudySettings, 'deltas' | 'draws' | 'seed'>> {}

export interface CheckArgs { studyPath: string }
export interface CheckReport {
  title: string;
  dataFile: string;
  sheet: string | null;
  rowsRead: number;
  rowsUsed: number;
  rowsExcluded: Array<{ reason: string; count: number; rows: number[] }>;
  outcomesMissing: Array<{ column: string; count: number }>;
  fidelity: Results['fidelity'];
  eligible: number;
  notes: Array<{ code: string; message: string }>;
  ruleWording: string;
}

export interface EvaluateArgs {
  studyPath: string;
  outDir: string;
  overrides?: SettingsOverrides;
  /** Memo formats to write besides results.json and units.csv; [] = none. */
  formats?: OutputFormat[];
  workspacePath?: string;
  workers?: number;
}
export interface EvaluateReport {
  outDir: string;
  files: string[];
  results: Results;
  runId: number | null;
  timings: Record<string, number>;
}

export interface DemoArgs { outDir: string; formats?: OutputFormat[]; workers?: number }

export interface ApiMethods {
  'study.check': { args: CheckArgs; result: CheckReport };
  'study.evaluate': { args: EvaluateArgs; result: EvaluateReport };
  'demo.run': { args: DemoArgs; result: EvaluateReport };
}
export type ApiMethod = keyof ApiMethods;
export const API_METHODS: readonly ApiMethod[] = ['study.check', 'study.evaluate', 'demo.run'];
