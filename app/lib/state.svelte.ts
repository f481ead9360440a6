// The app's state (Svelte 5 runes): the study being edited, what the main side last said about
// it, and the run. Screens read and change it; every call to the main side goes through the api
// client. Logic worth testing lives in the plain modules beside this one.

import type {
  ApiResult, CheckReport, DataPreview, EvaluateReport, ProgramCheck, ProgressEvent, SampleInfo, TryUnitReport, WorkspaceInfo, WorkspaceRecent, WorkspaceRun,
} from '../../main/contract/api.ts';
import type { Problem } from '../../main/contract/program.ts';
import type { Results } from '../../main/contract/results.ts';
import type { ApiClient, PickedFile } from './api-client.ts';
import { guessJoinKey } from './data-files.ts';
import { overallShare } from './progress.ts';
import { blankStudy, normalizeDraft, slug, tidyProgram, toStudyFile, type StudyDraft } from './draft.ts';
import { outOfDateText, readSession, SESSION_VERSION, type SessionState } from './session.ts';
import { pathStatus, type StepId } from './steps.ts';

export type RunState = 'idle' | 'running' | 'done' | 'failed' | 'cancelled';

const MEMO_EXT = /\.(pdf|docx|html|xlsx)$/i;
const dirOf = (p: string) => p.replace(/[\\/][^\\/]*$/, '') || '/';
const join = (dir: string, ...parts: string[]) => [dir.replace(/[\\/]+$/, ''), ...parts].join(dir.includes('\\') && !dir.includes('/') ? '\\' : '/');
const stamp = () => new Date().toISOString().replace(/[-:]/g, '').replace(/\..*$/, '').replace('T', '-');

export class AppState {
  step = $state<StepId>('start');
  info = $state<WorkspaceInfo | null>(null);
  startupProblems = $state<Problem[]>([]);
  samples = $state<SampleInfo[]>([]);
  recent = $state<WorkspaceRecent>({ studies: [], runs: [] });

  draft = $state<StudyDraft | null>(null);
  /** Folder the draft's relative data paths are relative to. */
  baseDir = $state<string | null>(null);
  /** The study file the draft came from or was last saved to. */
  studyPath = $state<string | null>(null);
  fromSample = $state(false);
  openProblems = $state<Problem[]>([]);
  busy = $state<string | null>(null);
  notice = $state('');

  programCheck = $state<ProgramCheck | null>(null);
  tryReport = $state<TryUnitReport | null>(null);
  tryProblems = $state<Problem[]>([]);

  preview = $state<DataPreview | null>(null);
  joinPreviews = $state<Record<string, DataPreview>>({});
  previewProblems = $state<Problem[]>([]);
  dataReport = $state<CheckReport | null>(null);
  dataProblems = $state<Problem[]>([]);
  dataReportKey = $state('');

  runState = $state<RunState>('idle');
  progress = $state<ProgressEvent | null>(null);
  runProblems = $state<Problem[]>([]);
  report = $state<EvaluateReport | null>(null);
  results = $state<Results | null>(null);
  memoFiles = $state<string[]>([]);
  memoProblems = $state<Problem[]>([]);
  /** The study file the last run in this session used (the workspace copy). */
  runStudyPath = $state<string | null>(null);
  private controller: AbortController | null = null;
  /** Job handle of the run in progress (followed again after a reload). */
  runJob = $state<string | null>(null);
  /** Fingerprint of the open study as it is now (study.fingerprint; null while it is not valid). */
  draftFingerprint = $state<string | null>(null);
  /** The draft's JSON as last opened or saved: anything else is an unsaved edit. */
  savedKey = $state('');
  /** The session was read back (autosave waits for it, so it never overwrites what it would restore). */
  restored = $state(false);
  /** A question the analyst must answer before going on (unsaved edits). */
  question = $state<{ text: string; answer: (a: 'save' | 'discard' | 'cancel') => void } | null>(null);

  constructor(readonly api: ApiClient) {}

  /** "These results are out of date: …" when the open study no longer matches the run shown. */
  get outOfDate(): string | null {
    return outOfDateText(this.report?.runId ?? null, this.report?.studySha256 ?? null, this.draftFingerprint);
  }

  get dirty(): boolean {
    return this.draft !== null && this.draftKey() !== this.savedKey;
  }

  async refreshFingerprint(): Promise<void> {
    if (!this.draft) { this.draftFingerprint = null; return; }
    const r = await this.api.call('study.fingerprint', { study: toStudyFile($state.snapshot(this.draft) as StudyDraft), ...(this.baseDir ? { baseDir: this.baseDir } : {}) });
    this.draftFingerprint = r.ok ? r.value.sha256 : null;
  }

  /** What the session keeps (session.ts). */
  sessionState(): SessionState {
    return {
      version: SESSION_VERSION,
      draft: this.draft ? toStudyFile($state.snapshot(this.draft) as StudyDraft) : null,
      baseDir: this.baseDir, studyPath: this.studyPath, fromSample: this.fromSample, savedKey: this.savedKey,
      step: this.step, runId: this.report?.runId ?? null, runJob: this.runJob,
    };
  }

  async saveSession(): Promise<void> {
    if (!this.restored || !this.info) return;
    await this.api.call('session.save', { state: this.sessionState() });
  }

  /** Reopen where the analyst was: the study with its unsaved edits, the step, the run shown, a run still going. */
  private async restoreSession(): Promise<void> {
    const r = await this.api.call('session.load', {});
    const s = r.ok ? readSession(r.value.state) : null;
    if (s && s.draft) {
      this.draft = normalizeDraft(s.draft);
      this.baseDir = s.baseDir; this.studyPath = s.studyPath; this.fromSample = s.fromSample; this.savedKey = s.savedKey;
      if (s.runId !== null) await this.showRecordedRun(s.runId);
      this.step = s.step;
      this.notice = 'Reopened where you were, with your unsaved edits.';
      if (s.runJob) void this.followRun(s.runJob);
      // What the main side said about the study is not kept: ask again (the data check gates Run).
      else if (this.draft.data.path) void this.checkData();
    }
    this.restored = true;
  }

  /** Ask before unsaved edits would be lost; 'save' saves them first. True when it is fine to go on. */
  async mayLeaveDraft(): Promise<boolean> {
    if (!this.dirty) return true;
    const title = this.draft?.title || this.draft?.program.name || 'the open study';
    const answer = await new Promise<'save' | 'discard' | 'cancel'>((resolve) => {
      this.question = { text: `“${title}” has changes that are not saved in a study file. Save them first?`, answer: resolve };
    });
    this.question = null;
    if (answer === 'cancel') return false;
    if (answer === 'save') return (await this.saveStudy(this.defaultSavePath())).length === 0;
    return true;
  }

  get status() {
    return pathStatus({
      draft: this.draft,
      programCheck: this.programCheck,
      dataReport: this.dataReport,
      dataReportCurrent: this.draft !== null && this.dataReportKey === this.dataKey(),
      run: this.report,
      runCurrent: this.outOfDate === null,
      memoFiles: this.memoFiles,
      memoFormatsAvailable: (this.info?.memoFormats.length ?? 0) > 0,
    });
  }

  draftKey(): string {
    return this.draft ? JSON.stringify(toStudyFile($state.snapshot(this.draft) as StudyDraft)) : '';
  }

  /** What the data check depends on: the study less the words it prints (outcome names, labels, title) and the run settings. */
  dataKey(): string {
    if (!this.draft) return '';
    const f = toStudyFile($state.snapshot(this.draft) as StudyDraft);
    return JSON.stringify({
      data: f.data, rule: f.program.rule, offer: f.program.offer,
      variables: f.program.variables.map((v) => [v.key, v.type, v.column, v.values ?? null]),
      columns: { ...f.columns, outcomes: f.columns.outcomes.map((o) => o.column) },
    });
  }

  /** The run's bar: overall share done, never moving backwards within a run. */
  runShare = $state(0);

  /** Resolve a data path of the draft for the main side (relative paths are relative to baseDir). */
  dataPath(p: string): string {
    if (/^([a-zA-Z]:[\\/]|[\\/])/.test(p) || !this.baseDir) return p;
    return join(this.baseDir, p);
  }

  async init(): Promise<void> {
    const info = await this.api.call('workspace.info', {});
    if (!info.ok) { this.startupProblems = info.error.problems; return; }
    this.info = info.value;
    const samples = await this.api.call('samples.list', {});
    if (samples.ok) this.samples = samples.value.samples;
    await this.restoreSession();
    await this.refreshRecent();
  }

  async refreshRecent(): Promise<void> {
    const r = await this.api.call('workspace.recent', {});
    if (r.ok) this.recent = r.value;
  }

  private resetDerived(): void {
    this.draftFingerprint = null;
    this.programCheck = null; this.tryReport = null; this.tryProblems = [];
    this.preview = null; this.joinPreviews = {}; this.previewProblems = [];
    this.dataReport = null; this.dataProblems = []; this.dataReportKey = '';
    this.runState = 'idle'; this.progress = null; this.runProblems = []; this.report = null; this.results = null;
    this.memoFiles = []; this.memoProblems = []; this.runStudyPath = null; this.runJob = null;
  }

  async newStudy(): Promise<void> {
    if (!(await this.mayLeaveDraft())) return;
    this.resetDerived();
    this.draft = blankStudy();
    this.savedKey = this.draftKey();
    this.baseDir = null; this.studyPath = null; this.fromSample = false; this.openProblems = [];
    this.step = 'rule';
  }

  async openStudy(path: string, fromSample = false): Promise<Problem[]> {
    if (!(await this.mayLeaveDraft())) return [];
    this.busy = 'Opening the study…';
    const r = await this.api.call('study.open', { path });
    this.busy = null;
    if (!r.ok) return r.error.problems;
    this.resetDerived();
    this.draft = normalizeDraft(r.value.study);
    this.savedKey = this.draftKey();
    this.baseDir = r.value.baseDir;
    this.studyPath = fromSample ? null : r.value.path;
    this.fromSample = fromSample;
    this.openProblems = r.value.problems;
    this.notice = `Opened ${this.draft.title || r.value.path}${r.value.problems.length ? ` — ${r.value.problems.length} problem(s) to fix` : ''}.`;
    this.step = 'rule';
    void this.refreshRecent();
    return [];
  }

  async saveStudy(path: string): Promise<Problem[]> {
    if (!this.draft) return [];
    const r = await this.api.call('study.save', { path, study: toStudyFile($state.snapshot(this.draft) as StudyDraft), ...(this.baseDir ? { baseDir: this.baseDir } : {}) });
    if (!r.ok) return r.error.problems;
    // Reopen what was written, so relative data paths are relative to the new folder.
    const reopened = await this.api.call('study.open', { path: r.value.path });
    if (reopened.ok) { this.draft = normalizeDraft(reopened.value.study); this.baseDir = reopened.value.baseDir; }
    this.savedKey = this.draftKey();
    this.studyPath = r.value.path;
    this.fromSample = false;
    this.notice = `Saved the study to ${r.value.path}.`;
    void this.refreshRecent();
    return [];
  }

  /** Where "Save" writes by default: the file it came from, else the workspace's studies folder. */
  defaultSavePath(): string {
    if (this.studyPath) return this.studyPath;
    const dir = this.info?.studiesDir ?? '';
    return join(dir, `${slug(this.draft?.title ?? '')}.json`);
  }

  async checkProgram(): Promise<void> {
    if (!this.draft) return;
    const program = tidyProgram($state.snapshot(this.draft.program) as StudyDraft['program']);
    const r = await this.api.call('program.check', { program });
    if (r.ok) this.programCheck = r.value;
  }

  async tryUnit(values: Record<string, string>): Promise<void> {
    if (!this.draft) return;
    const program = tidyProgram($state.snapshot(this.draft.program) as StudyDraft['program']);
    const r = await this.api.call('program.tryUnit', { program, values });
    if (r.ok) { this.tryReport = r.value; this.tryProblems = r.value.problems; }
    else { this.tryReport = null; this.tryProblems = r.error.problems; }
  }

  /** A preview is being read (the newest request wins; older answers are dropped). */
  previewLoading = $state(false);
  private previewSeq = 0;
  private previewAsked = '';

  async loadPreview(): Promise<void> {
    const d = this.draft;
    if (!d || !d.data.path.trim()) return;
    // The same files asked for while they are being read: the answer on its way serves both.
    const asked = JSON.stringify([this.dataPath(d.data.path.trim()), d.data.sheet ?? '', d.data.headerRow ?? 0, (d.data.join ?? []).map((j) => [j.path, j.sheet ?? '', j.headerRow ?? 0])]);
    if (this.previewLoading && asked === this.previewAsked) return;
    this.previewAsked = asked;
    const mine = ++this.previewSeq;
    this.previewLoading = true;
    this.busy = 'Reading the data file…';
    const program = tidyProgram($state.snapshot(d.program) as StudyDraft['program']);
    const r = await this.api.call('data.preview', {
      path: this.dataPath(d.data.path.trim()), program,
      ...(d.data.sheet ? { sheet: d.data.sheet } : {}), ...(d.data.headerRow ? { headerRow: d.data.headerRow } : {}),
    }, { onProgress: (p) => { this.progress = p; } });
    const joins: Record<string, DataPreview> = {};
    const problems: Problem[] = r.ok ? [] : r.error.problems;
    for (const [i, j] of (d.data.join ?? []).entries()) {
      const jr = await this.api.call('data.preview', { path: this.dataPath(j.path), ...(j.sheet ? { sheet: j.sheet } : {}), ...(j.headerRow ? { headerRow: j.headerRow } : {}) });
      if (jr.ok) joins[j.path] = jr.value;
      else problems.push(...jr.error.problems.map((p) => ({ ...p, path: `data.join[${i}]` })));
    }
    if (mine !== this.previewSeq) return; // a newer file was chosen meanwhile
    this.previewLoading = false;
    this.busy = null;
    this.progress = null;
    this.preview = r.ok ? r.value : null;
    this.joinPreviews = joins;
    this.previewProblems = problems;
    if (r.ok && !d.data.sheet && r.value.sheet) d.data.sheet = r.value.sheet;
  }

  async checkData(): Promise<void> {
    if (!this.draft) return;
    this.busy = 'Checking the data against the study…';
    const key = this.dataKey();
    const r = await this.api.call('data.check', { study: toStudyFile($state.snapshot(this.draft) as StudyDraft), ...(this.baseDir ? { baseDir: this.baseDir } : {}) }, { onProgress: (p) => { this.progress = p; } });
    this.busy = null;
    this.progress = null;
    this.dataReportKey = key;
    if (r.ok) { this.dataReport = r.value; this.dataProblems = []; }
    else { this.dataReport = null; this.dataProblems = r.error.problems; }
  }

  /** Files picked or dropped on the Data step (browser mode): each is handed to the host; the first becomes the data file when there is none, the others are linked by the unit ID. */
  async addFiles(files: readonly PickedFile[]): Promise<Problem[]> {
    const d = this.draft;
    if (!d || files.length === 0) return [];
    const problems: Problem[] = [];
    const kept: Array<{ path: string; name: string }> = [];
    for (const [i, f] of files.entries()) {
      this.busy = `Opening ${f.name}${files.length > 1 ? ` (${i + 1} of ${files.length})` : ''}…`;
      const r = await this.api.upload(f);
      if (r.ok) kept.push({ path: r.value.path, name: r.value.name });
      else problems.push(...r.error.problems.map((p) => ({ ...p, path: 'data.path' })));
    }
    this.busy = null;
    if (kept.length === 0) return problems;
    if (!d.data.path) {
      const main = kept.shift()!;
      this.setDataFile(main.path, main.name);
      await this.loadPreview();
    }
    for (const k of kept) problems.push(...(await this.linkFile(k.path, k.name)));
    if (kept.length) await this.loadPreview();
    return problems;
  }

  /** The data file, chosen by path (typed, the native dialog, or a kept upload with its own name). */
  setDataFile(path: string, fileName?: string): void {
    const d = this.draft;
    if (!d) return;
    const same = this.dataPath(d.data.path) === this.dataPath(path);
    d.data.path = path;
    if (fileName) d.data.fileName = fileName; else delete d.data.fileName;
    this.dataProblems = [];
    if (same) return; // the same file again: read it again, keeping what is shown meanwhile
    delete d.data.sheet;
    delete d.data.headerRow;
    this.dataReport = null;
    this.preview = null;
  }

  /** Link a second file by the unit ID, the key column guessed from its names. */
  async linkFile(path: string, fileName?: string): Promise<Problem[]> {
    const d = this.draft;
    if (!d) return [];
    const name = fileName ?? path.split(/[\/]/).pop() ?? path;
    const pr = await this.api.call('data.preview', { path: this.dataPath(path) });
    if (!pr.ok) return pr.error.problems.map((p) => ({ ...p, path: 'data.join' }));
    const key = guessJoinKey(pr.value, d.columns.id || (this.preview?.columns.find((c) => c.suggestion?.role === 'id')?.name ?? ''));
    if (!key) return [{ path: 'data.join', message: `${name}: no column looks like the unit ID. Link it below and say which column holds the ID.` }];
    d.data.join = [...(d.data.join ?? []), { path, key, ...(fileName ? { fileName } : {}) }];
    return [];
  }

  /** Electron: the native open dialog. */
  async chooseDataFile(): Promise<Problem[]> {
    const r = await this.api.call('dialog.openFile', { purpose: 'data' });
    if (!r.ok) return r.error.problems;
    if (!r.value.path) return [];
    this.setDataFile(r.value.path);
    await this.loadPreview();
    return [];
  }

  async run(): Promise<void> {
    const d = this.draft;
    const info = this.info;
    if (!d || !info) return;
    this.runProblems = [];
    this.runState = 'running';
    this.runShare = 0;
    this.progress = { stage: 'saving', done: 0, total: 1 };
    const name = slug(d.title || d.program.name);
    // The study as run is kept in the workspace, next to the run's files; the analyst's own file is changed only by Save.
    const studyPath = join(info.studiesDir, name, 'study.json');
    const saved = await this.api.call('study.save', { path: studyPath, study: toStudyFile($state.snapshot(d) as StudyDraft), ...(this.baseDir ? { baseDir: this.baseDir } : {}) });
    if (!saved.ok) { this.runState = 'failed'; this.runProblems = saved.error.problems; return; }
    this.runStudyPath = saved.value.path;
    this.controller = new AbortController();
    const r = await this.api.call('study.evaluate', {
      studyPath: saved.value.path, outDir: join(info.runsDir, `${name}-${stamp()}`), formats: [...info.memoFormats], workspacePath: info.workspacePath,
    }, {
      onProgress: (p) => { this.progress = p; this.runShare = overallShare(p, this.runShare); },
      signal: this.controller.signal,
      onStarted: (handle) => { this.runJob = handle; void this.saveSession(); },
    });
    this.finishRun(r);
  }

  /** A run started before the page was reloaded: follow it again, with its progress, and let it be cancelled. */
  private async followRun(handle: string): Promise<void> {
    this.runState = 'running';
    this.runShare = 0;
    this.runJob = handle;
    this.controller = new AbortController();
    const r = await this.api.resume('study.evaluate', handle, {
      onProgress: (p) => { this.progress = p; this.runShare = overallShare(p, this.runShare); },
      signal: this.controller.signal,
    });
    if (r === null) { this.controller = null; this.runJob = null; this.runState = 'idle'; this.progress = null; return; }
    this.finishRun(r);
  }

  private finishRun(r: ApiResult<EvaluateReport>): void {
    this.controller = null;
    this.runJob = null;
    this.progress = null;
    if (!r.ok) { this.runState = r.error.kind === 'cancelled' ? 'cancelled' : 'failed'; this.runProblems = r.error.problems; void this.saveSession(); return; }
    this.applyRun(r.value);
  }

  private applyRun(report: EvaluateReport): void {
    this.report = report;
    this.results = report.results;
    this.memoFiles = report.files.filter((f) => MEMO_EXT.test(f));
    this.runState = 'done';
    const used = report.results.study.rowsUsed;
    this.notice = `The run finished: ${used.toLocaleString('en-US')} unit${used === 1 ? '' : 's'} used. Files are in ${report.outDir}.`;
    void this.refreshRecent();
    void this.saveSession();
  }

  cancelRun(): void {
    this.controller?.abort();
  }

  /** Write the memo of the run shown again, in another folder, in the formats chosen (from the stored run: nothing is run again). */
  async writeMemo(formats: Array<'pdf' | 'html' | 'docx' | 'xlsx'>, outDir: string): Promise<void> {
    this.memoProblems = [];
    const runId = this.report?.runId;
    if (!runId) { this.memoProblems = [{ path: '', message: 'Run the study, or open one of its recorded runs, first; the memo is written from a run.' }]; return; }
    this.busy = 'Writing the memo…';
    const r = await this.api.call('run.exportMemo', { runId, outDir, formats }, { onProgress: (p) => { this.progress = p; } });
    this.busy = null;
    this.progress = null;
    if (!r.ok) { this.memoProblems = r.error.problems; return; }
    this.memoFiles = r.value.files.filter((f) => MEMO_EXT.test(f));
    const n = r.value.files.length;
    this.notice = `Wrote ${n} file${n === 1 ? '' : 's'} to ${r.value.outDir}: ${r.value.files.map((f) => f.split(/[\\/]/).pop()).join(', ')}.`;
  }

  async openRecordedRun(runId: number): Promise<Problem[]> {
    if (!(await this.mayLeaveDraft())) return [];
    const r = await this.api.call('workspace.run', { runId });
    if (!r.ok) return r.error.problems;
    this.resetDerived();
    this.draft = normalizeDraft(r.value.study);
    this.savedKey = this.draftKey();
    this.baseDir = null; this.studyPath = null; this.fromSample = false; this.openProblems = [];
    this.draftFingerprint = null;
    void this.refreshFingerprint();
    this.showRun(r.value);
    if (r.value.status === 'complete') this.notice = `Opened run ${r.value.runId} of “${r.value.studyName}”: its results, map and memo files, as recorded.`;
    this.step = 'evidence';
    if (this.draft.data.path) void this.checkData(); // the study as run names its files by full path
    return [];
  }

  /** Show a stored run beside the open study (after a reload), without replacing the study. */
  private async showRecordedRun(runId: number): Promise<void> {
    const r = await this.api.call('workspace.run', { runId });
    if (r.ok) this.showRun(r.value);
  }

  private showRun(run: WorkspaceRun): void {
    this.results = run.results;
    this.report = { outDir: run.outDir, files: run.files, results: run.results, runId: run.runId, studySha256: run.studySha256, timings: {} };
    this.memoFiles = run.files.filter((f) => MEMO_EXT.test(f));
    this.runState = 'done';
    if (run.status === 'writing') this.notice = `Run ${run.runId} was interrupted while its files were written: some of them may be missing. Run the study again for a complete set.`;
  }
}

export { dirOf };
