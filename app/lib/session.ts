// What the app keeps of itself between page loads (session.save / session.load): the open study
// with its unsaved edits, where it came from, the current step, the run shown and a run still in
// progress. Pure: the shape, and a check of what comes back (it is untrusted data from disk: a
// damaged or older session is dropped rather than half applied).

import type { StepId } from './steps.ts';
import { STEP_TITLES } from './steps.ts';

export const SESSION_VERSION = 1;

export interface SessionState {
  version: typeof SESSION_VERSION;
  /** The study as edited (the draft's study-file form), or null when none is open. */
  draft: unknown;
  baseDir: string | null;
  studyPath: string | null;
  fromSample: boolean;
  /** The draft as last opened or saved (to tell unsaved edits), as its JSON text. */
  savedKey: string;
  step: StepId;
  /** The run shown (a stored run in the workspace). */
  runId: number | null;
  /** A run in progress: its job handle, to follow it again after a reload. */
  runJob: string | null;
}

const isStep = (v: unknown): v is StepId => typeof v === 'string' && Object.hasOwn(STEP_TITLES, v);
const textOrNull = (v: unknown): v is string | null => v === null || typeof v === 'string';

/** The session as saved, or null when it is not one this version can restore. */
export function readSession(value: unknown): SessionState | null {
  if (!value || typeof value !== 'object') return null;
  const s = value as Record<string, unknown>;
  if (s.version !== SESSION_VERSION) return null;
  if (!textOrNull(s.baseDir) || !textOrNull(s.studyPath) || !textOrNull(s.runJob) || typeof s.savedKey !== 'string') return null;
  if (typeof s.fromSample !== 'boolean' || !isStep(s.step)) return null;
  if (!(s.runId === null || (typeof s.runId === 'number' && Number.isSafeInteger(s.runId) && s.runId > 0))) return null;
  if (s.draft !== null && (typeof s.draft !== 'object' || Array.isArray(s.draft))) return null;
  return {
    version: SESSION_VERSION, draft: s.draft ?? null, baseDir: s.baseDir, studyPath: s.studyPath, fromSample: s.fromSample,
    savedKey: s.savedKey, step: s.step, runId: (s.runId as number | null), runJob: s.runJob,
  };
}

/** The words at the top of a screen whose run no longer matches the open study (null when it does). */
export function outOfDateText(runId: number | null, runFingerprint: string | null, draftFingerprint: string | null): string | null {
  if (runId === null || !runFingerprint || !draftFingerprint || runFingerprint === draftFingerprint) return null;
  return `These results are out of date: the study changed since run ${runId}.`;
}
