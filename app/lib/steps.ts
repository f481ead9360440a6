// The guided path: which steps are done and what each still needs, so the side bar can say so.
// Movement between steps is free; this only reports. Pure.

import type { CheckReport, EvaluateReport, ProgramCheck } from '../../main/contract/api.ts';
import type { StudyDraft } from './draft.ts';

export type StepId = 'start' | 'rule' | 'data' | 'run' | 'evidence' | 'map' | 'memo';

export interface StepStatus { id: StepId; title: string; done: boolean; missing: string[] }

export interface PathState {
  draft: StudyDraft | null;
  programCheck: ProgramCheck | null;
  dataReport: CheckReport | null;
  /** The data report is for the draft as it is now (nothing changed since the check). */
  dataReportCurrent: boolean;
  run: EvaluateReport | null;
  /** The run is of the study as it is now (its fingerprint matches); false: its results are out of date. */
  runCurrent: boolean;
  memoFiles: string[];
  memoFormatsAvailable: boolean;
}

export const STEP_TITLES: Record<StepId, string> = {
  start: 'Start', rule: 'Rule', data: 'Data', run: 'Run', evidence: 'Evidence', map: 'Map', memo: 'Memo',
};

export function pathStatus(s: PathState): StepStatus[] {
  const d = s.draft;
  const step = (id: StepId, missing: string[]): StepStatus => ({ id, title: STEP_TITLES[id], done: missing.length === 0, missing });
  const rule: string[] = [];
  if (!d) rule.push('open or start a study');
  else {
    if (d.program.variables.length === 0) rule.push('declare the variables the rule reads');
    if (!s.programCheck) rule.push('check the rule');
    else if (!s.programCheck.valid) rule.push(`fix ${s.programCheck.problems.length} problem${s.programCheck.problems.length === 1 ? '' : 's'} in the rule`);
  }
  const data: string[] = [];
  if (!d) data.push('open or start a study');
  else {
    if (!d.data.path) data.push('choose the data file');
    if (!d.columns.id) data.push('choose the ID column');
    if (d.program.variables.some((v) => !v.column)) data.push('choose a column for every rule input');
    if (d.columns.outcomes.length === 0) data.push('choose at least one outcome');
    else if (d.columns.outcomes.some((o) => !(o.label ?? '').trim())) data.push('name each outcome for the memo');
    if (!s.dataReport || !s.dataReportCurrent) data.push('check the data');
  }
  // Done is a fact about the study as it is now: a run of an earlier version is out of date.
  const stale = s.run !== null && !s.runCurrent;
  const run: string[] = !s.run ? ['run the study'] : stale ? ['run again: the study changed since its last run'] : [];
  const evidence: string[] = !s.run ? ['run the study first'] : stale ? ['out of date: run the study again'] : [];
  const memo: string[] = !s.run ? ['run the study first'] : stale ? ['out of date: run the study again'] : !s.memoFormatsAvailable ? ['memo files are not available in this version'] : s.memoFiles.length ? [] : ['write the memo files'];
  return [
    step('start', d ? [] : ['open a study, a sample, or start a new one']),
    step('rule', rule),
    step('data', data),
    step('run', run),
    step('evidence', evidence),
    step('map', evidence),
    step('memo', memo),
  ];
}

/** "0.05, 0.1, 0.2" → numbers, or a message saying which entry is not a number. */
export function parseNumberList(text: string): { ok: true; values: number[] } | { ok: false; message: string } {
  const parts = text.split(/[,;\s]+/).map((p) => p.trim()).filter((p) => p !== '');
  if (parts.length === 0) return { ok: false, message: 'Give at least one radius, e.g. 0.05, 0.1, 0.2.' };
  const values: number[] = [];
  for (const p of parts) {
    const v = Number(p);
    if (!Number.isFinite(v)) return { ok: false, message: `"${p}" is not a number; separate radii with commas, e.g. 0.05, 0.1, 0.2.` };
    values.push(v);
  }
  return { ok: true, values };
}
