// Study files for the app: open one (problems come back with the document so the analyst can
// fix them on screen), save one (validated first; data paths rewritten for the new folder), and
// list the bundled sample programs. Validation and loading live in main/studyfile.

import { readFileSync, readdirSync, statSync } from 'node:fs';
import { basename, dirname, isAbsolute, join, relative, resolve, sep } from 'node:path';
import type { ApiResult, SamplesList, StudyOpenArgs, StudyOpened, StudySaveArgs, StudySaved } from '../contract/api.ts';
import type { Study } from '../contract/study.ts';
import { writeFilesAtomically } from '../output/write-files.ts';
import { getOwn, isPlainObject } from '../rules/json-read.ts';
import { parseJsonText } from '../studyfile/load.ts';
import { validateStudy } from '../studyfile/validate.ts';
import { grantStudyFiles, loadAllowedStudy, readProblem, refuseIf, studyFilesProblems, writeProblem } from './access.ts';
import { refuse } from './context.ts';
import type { HostContext } from './host.ts';
import { rememberStudy } from './workspace.ts';
import { SAMPLES_DIR } from '../resources.ts';

const MAX_STUDY_BYTES = 20 * 2 ** 20;

function readJson(path: string): ApiResult<unknown> {
  const label = basename(path);
  let size: number;
  try { size = statSync(path).size; } catch {
    return refuse([{ path: 'path', message: `${label} was not found (looked for ${path}). Check the folder and the file name.` }]);
  }
  if (size > MAX_STUDY_BYTES) return refuse([{ path: 'path', message: `${label} is ${Math.round(size / 2 ** 20)} MB: a study file is small JSON text; is this the data file?` }]);
  let text: string;
  try { text = readFileSync(path, 'utf8'); } catch (e) {
    return refuse([{ path: 'path', message: `${label} could not be read (${(e as NodeJS.ErrnoException).code ?? 'read error'}). Check that you may read it.` }]);
  }
  const parsed = parseJsonText(text, label);
  return parsed.ok ? { ok: true, value: parsed.value } : refuse(parsed.problems.map((p) => ({ ...p, path: 'path' })));
}

export async function openStudy(args: StudyOpenArgs, ctx: HostContext = {}): Promise<ApiResult<StudyOpened>> {
  const path = resolve(args.path);
  const denied = refuseIf(readProblem(ctx, path, 'path'));
  if (denied) return denied;
  if (!/\.json$/i.test(path)) return refuse([{ path: 'path', message: `${basename(path)} is not a study file: a study file is JSON text ending in .json. To bring in data, use the Data step.` }]);
  const raw = readJson(path);
  if (!raw.ok) return raw;
  const baseDir = dirname(path);
  const loaded = loadAllowedStudy(ctx, path, 'path');
  const title = isPlainObject(raw.value) && typeof getOwn(raw.value, 'title') === 'string' ? String(getOwn(raw.value, 'title')) : basename(path);
  rememberStudy(ctx, path, title);
  if (loaded.ok) {
    // A study the user picked vouches for its data files: the page may now name them (data.check, study.save).
    if (ctx.access) grantStudyFiles(ctx.access, loaded.value.study, baseDir, path);
    const { programPath: _separateFile, ...study } = loaded.value.study;
    return { ok: true, value: { path, baseDir, study, problems: [] } };
  }
  return { ok: true, value: { path, baseDir, study: raw.value, problems: loaded.problems } };
}

/** A data path written for a study in `toDir`: relative when the file sits in that folder or below, else absolute. */
export function rebasePath(p: string, fromDir: string, toDir: string): string {
  const abs = isAbsolute(p) ? p : resolve(fromDir, p);
  const rel = relative(toDir, abs);
  return rel !== '' && !rel.startsWith('..') && !isAbsolute(rel) ? rel.split(sep).join('/') : abs;
}

/** The study's data paths (unit file, joined files, the treatment's "listed in" source) for a new folder. */
export function rebaseStudy(study: Study, fromDir: string, toDir: string): Study {
  const moved = new Map<string, string>();
  const join = study.data.join?.map((j) => {
    const path = rebasePath(j.path, fromDir, toDir);
    moved.set(j.path, path);
    return { ...j, path };
  });
  const t = study.columns.treatment;
  const treatment = t !== undefined && typeof t === 'object' ? { listedIn: moved.get(t.listedIn) ?? t.listedIn } : t;
  return {
    ...study,
    data: { ...study.data, path: rebasePath(study.data.path, fromDir, toDir), ...(join ? { join } : {}) },
    columns: { ...study.columns, ...(treatment !== undefined ? { treatment } : {}) },
  };
}

export async function saveStudy(args: StudySaveArgs, ctx: HostContext = {}): Promise<ApiResult<StudySaved>> {
  const path = resolve(args.path);
  if (!/\.json$/i.test(path)) return refuse([{ path: 'path', message: `Save the study under a name ending in .json (for example ${basename(path).replace(/\.[^.]*$/, '')}.json).` }]);
  const checked = validateStudy(args.study);
  if (!checked.ok) return refuse(checked.problems);
  const denied = refuseIf(writeProblem(ctx, path, 'path'));
  if (denied) return denied;
  const { programPath: _separateFile, ...study } = rebaseStudy(checked.value, args.baseDir ?? dirname(path), dirname(path));
  // Whatever the page wrote, the saved study may name only files this session may read.
  const unread = studyFilesProblems(ctx, study, dirname(path));
  if (unread.length) return refuse(unread);
  try {
    writeFilesAtomically(dirname(path), [{ name: basename(path), content: JSON.stringify(study, null, 2) + '\n' }]);
  } catch (e) {
    return refuse([{ path: 'path', message: `The study could not be saved at ${path} (${(e as NodeJS.ErrnoException).code ?? 'write error'}). Choose a folder you may write to.` }]);
  }
  rememberStudy(ctx, path, study.title);
  return { ok: true, value: { path } };
}

export async function listSamples(): Promise<ApiResult<SamplesList>> {
  let names: string[];
  try { names = readdirSync(SAMPLES_DIR).sort(); } catch { return { ok: true, value: { samples: [] } }; }
  const samples = names.flatMap((id) => {
    const studyPath = join(SAMPLES_DIR, id, 'study.json');
    const raw = readJson(studyPath);
    if (!raw.ok || !isPlainObject(raw.value)) return [];
    const title = getOwn(raw.value, 'title');
    const description = getOwn(raw.value, 'description');
    return [{ id, title: typeof title === 'string' ? title : id, description: typeof description === 'string' ? description : readmeSummary(join(SAMPLES_DIR, id, 'README.md')), studyPath }];
  });
  return { ok: true, value: { samples } };
}

/** The first paragraph of a sample's README, as plain text. */
function readmeSummary(path: string): string {
  let text: string;
  try { text = readFileSync(path, 'utf8'); } catch { return ''; }
  // The paragraph that states the rule says most about a sample; otherwise the first paragraph.
  const paras = text.split(/\n\s*\n/).filter((p) => p.trim() !== '' && !p.trim().startsWith('#')).map((p) => p.replace(/\s+/g, ' ').replace(/[*`]/g, '').trim());
  const plain = paras.find((p) => /^the rule/i.test(p)) ?? paras[0] ?? '';
  return plain.length > 320 ? `${plain.slice(0, plain.lastIndexOf(' ', 317))} …` : plain;
}
