// Reading a study file from disk: JSON with line-and-column messages, a separate program file
// resolved relative to the study, then validation (validate.ts).

import { readFileSync, statSync } from 'node:fs';
import { basename, dirname, resolve } from 'node:path';
import type { Study } from '../contract/study.ts';
import type { Checked } from '../rules/types.ts';
import { studyFingerprint } from './fingerprint.ts';
import { validateStudy } from './validate.ts';

const MAX_STUDY_BYTES = 20 * 2 ** 20;

export interface LoadedStudy {
  study: Study;
  /** Absolute path of the study file. */
  studyPath: string;
  /** Folder that relative paths in the study are resolved against. */
  baseDir: string;
  /** The study's content hash (fingerprint.ts), computed once here. */
  sha256: string;
}

/** Line and column (1-based) of a character offset. */
function lineColumn(textValue: string, offset: number): { line: number; column: number } {
  const before = textValue.slice(0, offset);
  const line = before.split('\n').length;
  return { line, column: offset - before.lastIndexOf('\n') };
}

/** Parse JSON text, turning a syntax error into a sentence with line and column. */
export function parseJsonText(textValue: string, fileLabel: string): Checked<unknown> {
  const clean = textValue.charCodeAt(0) === 0xfeff ? textValue.slice(1) : textValue;
  try {
    return { ok: true, value: JSON.parse(clean) as unknown };
  } catch (e) {
    const message = (e as Error).message;
    const m = /position (\d+)/.exec(message);
    const where = m ? (() => { const lc = lineColumn(clean, Number(m[1])); return ` at line ${lc.line}, column ${lc.column}`; })() : '';
    // Never quote the text itself (V8 puts the start of it in "Unexpected token" messages): the
    // file may not be a study at all, and its content is not the page's to see.
    const detail = /^Unexpected token/.test(message) ? 'an unexpected character'
      : message.replace(/^JSON\.parse: /, '').replace(/ in JSON at position \d+.*$/, '').replace(/ at position \d+.*$/, '').replace(/"[^]*$/, '').trim() || 'a syntax error';
    return { ok: false, problems: [{ path: fileLabel, message: `${fileLabel} is not valid JSON${where} (${detail}). Check for a missing comma, quote or brace there.` }] };
  }
}

function readJsonFile(path: string, label: string): Checked<unknown> {
  let size: number;
  try {
    size = statSync(path).size;
  } catch {
    return { ok: false, problems: [{ path: label, message: `${label} was not found (looked for ${path}). Check the path and the file name.` }] };
  }
  if (size > MAX_STUDY_BYTES) return { ok: false, problems: [{ path: label, message: `${label} is ${Math.round(size / 2 ** 20)} MB: a study or program file is small JSON text; is this the data file?` }] };
  let textValue: string;
  try {
    textValue = readFileSync(path, 'utf8');
  } catch (e) {
    return { ok: false, problems: [{ path: label, message: `${label} could not be read (${(e as NodeJS.ErrnoException).code ?? 'read error'}). Check that the file is not locked and that you may read it.` }] };
  }
  return parseJsonText(textValue, label);
}

export function loadStudyFile(studyPath: string): Checked<LoadedStudy> {
  const abs = resolve(studyPath);
  const label = basename(abs);
  const raw = readJsonFile(abs, label);
  if (!raw.ok) return raw;
  const baseDir = dirname(abs);
  let input = raw.value;
  let programPath: string | undefined;
  if (input !== null && typeof input === 'object' && !Array.isArray(input)) {
    const program = (input as Record<string, unknown>).program;
    if (typeof program === 'string' && program.trim() !== '') {
      programPath = program;
      const loaded = readJsonFile(resolve(baseDir, program), program);
      if (!loaded.ok) return { ok: false, problems: loaded.problems.map((p) => ({ path: 'program', message: p.message })) };
      input = { ...(input as Record<string, unknown>), program: loaded.value };
    }
  }
  const study = validateStudy(input, programPath ? { programPath } : {});
  if (!study.ok) return study;
  return { ok: true, value: { study: study.value, studyPath: abs, baseDir, sha256: studyFingerprint(study.value, baseDir) } };
}
