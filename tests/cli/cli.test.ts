// The command line end to end, as a user runs it (docs/cli.md): exit codes, messages, the files
// it writes, and byte-identical results for the same study, data and seed.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync, copyFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { progressPrinter } from '../../main/cli/progress.ts';
import { winterCreditSample } from '../../main/sample-data/winter-credit.ts';

const ROOT = join(__dirname, '../..');
const SAMPLE = join(ROOT, 'sample-programs/winter-credit/study.json');

function cli(...args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(ROOT, 'main/cli.ts'), ...args], { cwd: ROOT, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
const tmp = () => mkdtempSync(join(tmpdir(), 'fenceline-cli-'));

const SAMPLE_DIR = join(ROOT, 'sample-programs/winter-credit');

/** A copy of the sample study in a temp folder, changed by `edit`, with its data files beside it. */
function studyCopy(edit: (s: any) => void, files: Record<string, string> = {}): string {
  const dir = tmp();
  const s = JSON.parse(readFileSync(SAMPLE, 'utf8'));
  edit(s);
  writeFileSync(join(dir, 'study.json'), JSON.stringify(s, null, 2));
  for (const f of ['applicants.xlsx', 'payments.xlsx', 'outcomes.csv']) copyFileSync(join(SAMPLE_DIR, f), join(dir, f));
  for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text);
  return join(dir, 'study.json');
}

/** The sample's roster as CSV text (RFC 4180, CRLF), from its generator. */
function rosterCsv(): string {
  const { roster } = winterCreditSample();
  const field = (v: string | number | null) => (v === null ? '' : /[",\r\n]/.test(String(v)) ? `"${String(v).replace(/"/g, '""')}"` : String(v));
  return [roster.header.join(','), ...roster.rows.map((r) => r.map(field).join(','))].join('\r\n') + '\r\n';
}

describe('fenceline evaluate', () => {
  it('writes results.json and units.csv with the keys docs/cli.md requires, byte-identical on a second run', () => {
    const out1 = tmp(), out2 = tmp();
    const a = cli('evaluate', SAMPLE, '--out', out1, '--formats', 'none', '--draws', '500');
    expect(a.code, a.stderr).toBe(0);
    expect(a.stdout).toMatch(/Utility arrears in March/);
    const b = cli('evaluate', SAMPLE, '--out', out2, '--formats', 'none', '--draws', '500', '--workers', '0');
    expect(b.code, b.stderr).toBe(0);
    const r1 = readFileSync(join(out1, 'results.json'), 'utf8');
    expect(readFileSync(join(out2, 'results.json'), 'utf8')).toBe(r1);
    expect(readFileSync(join(out2, 'units.csv'), 'utf8')).toBe(readFileSync(join(out1, 'units.csv'), 'utf8'));

    const r = JSON.parse(r1);
    expect(r.fenceline).toBe(1);
    expect(typeof r.version).toBe('string');
    for (const k of ['title', 'dataFile', 'dataSha256', 'rowsRead', 'rowsUsed', 'rowsExcluded']) expect(r.study).toHaveProperty(k);
    expect(r.study.dataSha256).toMatch(/^[0-9a-f]{64}$/);
    expect(r.settings).toMatchObject({ deltas: [0.05, 0.1, 0.2], draws: 500, seed: 1 });
    for (const k of ['compared', 'agree', 'disagree', 'disagreeIds']) expect(r.fidelity).toHaveProperty(k);
    const o = r.outcomes[0];
    expect(o.column).toBe('ARREARS_MARCH');
    for (const d of o.byDelta) {
      for (const k of ['delta', 'n', 'estimate', 'se', 'ci', 'p', 'firstStage', 'reducedForm', 'arCi']) expect(d).toHaveProperty(k);
      expect(d.firstStage).toHaveProperty('F');
    }
    for (const k of ['naiveOls', 'ivNoControl']) expect(o[k]).toHaveProperty('estimate');
    expect(r.balance.length).toBe(2 * 3);
    expect(Array.isArray(r.warnings)).toBe(true);

    const units = readFileSync(join(out1, 'units.csv'), 'utf8').trim().split(/\r?\n/);
    expect(units[0]).toBe('id,z,d,aps_0.05,aps_0.1,aps_0.2');
    expect(units.length - 1).toBe(r.study.rowsUsed);
    // no temporary files left behind
    expect(readdirSync(out1).sort()).toEqual(['results.json', 'units.csv']);
  });

  it('recovers the invented effect (−40) within its interval at the widest delta', () => {
    const out = tmp();
    expect(cli('evaluate', SAMPLE, '--out', out, '--formats', 'none', '--draws', '500').code).toBe(0);
    const r = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8'));
    const d = r.outcomes[0].byDelta[2];
    expect(d.ci[0]).toBeLessThan(-40);
    expect(d.ci[1]).toBeGreaterThan(-40);
    // and the naive comparison is far from it (selection on unobserved need)
    expect(Math.abs(r.outcomes[0].naiveOls.estimate + 40)).toBeGreaterThan(20);
  });

  it('counts every excluded row with its reason and spreadsheet row (roster as CSV, joined to the other two files)', () => {
    const lines = rosterCsv().split('\r\n');
    lines[5] = lines[5]!.replace(/^(A-\d+),\d+,/, '$1,n/a,'); // HH_INCOME not a number on spreadsheet row 6
    const path = studyCopy((s) => { s.data.path = 'applicants.csv'; delete s.data.sheet; }, { 'applicants.csv': lines.join('\r\n') });
    const out = tmp();
    const res = cli('evaluate', path, '--out', out, '--formats', 'none', '--draws', '200');
    expect(res.code, res.stderr).toBe(0);
    const r = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8'));
    // the generator's planted rows sit 2 rows higher in the CSV (no title line, no empty row)
    const planted = winterCreditSample().planted.map((p) => ({ ...p, sheetRow: p.sheetRow - 2 }));
    expect(r.study.rowsUsed).toBe(r.study.rowsRead - 1 - planted.length);
    const income = r.study.rowsExcluded.find((e: any) => e.reason === 'HH_INCOME is not a number');
    expect(income.rows).toEqual([6, ...planted.filter((p) => p.reason === 'HH_INCOME is not a number').map((p) => p.sheetRow)].sort((a, b) => a - b));
    expect(income.count).toBe(income.rows.length);
    expect(r.study.dataFile).toBe('applicants.csv');
    expect(r.study.joins.map((j: any) => j.source)).toEqual(['payments.xlsx', 'outcomes.csv']);
  });

  it('records the run in a workspace file', () => {
    const out = tmp();
    const ws = join(tmp(), 'work.db');
    const res = cli('evaluate', SAMPLE, '--out', out, '--formats', 'none', '--draws', '200', '--workspace', ws);
    expect(res.code, res.stderr).toBe(0);
    expect(res.stdout).toMatch(/run 1 saved in the workspace/);
    expect(existsSync(ws)).toBe(true);
  });
});

describe('wrong input: exit 2, one clear message, no stack trace', () => {
  const cases: Array<[string, () => string[], RegExp]> = [
    ['a missing study file', () => ['evaluate', join(tmp(), 'nope.json'), '--out', tmp()], /nope\.json was not found/],
    ['no --out', () => ['evaluate', SAMPLE], /add --out <dir>/],
    ['a bad --deltas list', () => ['evaluate', SAMPLE, '--out', tmp(), '--deltas', '0.1,abc'], /--deltas: "abc" is not a number/],
    ['a negative delta', () => ['evaluate', SAMPLE, '--out', tmp(), '--deltas=-0.1'], /--deltas: Each delta must be a positive number/],
    ['an unknown memo format', () => ['evaluate', SAMPLE, '--out', tmp(), '--formats', 'odt'], /"odt" is not a memo format/],
    ['an unknown command', () => ['estimate', SAMPLE], /"estimate" is not a command/],
    ['a misspelt column', () => ['check', studyCopy((s) => { s.columns.outcomes[0].column = 'ARREARS_MARCHH'; })], /columns\.outcomes\[0\]\.column: .*did you mean ARREARS_MARCH/],
    ['a study with a syntax error', () => {
      const p = studyCopy(() => {});
      writeFileSync(p, readFileSync(p, 'utf8').replace('"title"', '"title" "x",'));
      return ['check', p];
    }, /not valid JSON at line 3/],
    ['a missing data file', () => ['check', studyCopy((s) => { s.data.path = 'applicants2.csv'; })], /applicants2\.csv/],
  ];
  it.each(cases)('%s', (_name, args, message) => {
    const r = cli(...args());
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr).not.toMatch(/\n\s+at .+\(.*:\d+:\d+\)/); // no stack frames
  });
});

describe('fenceline check', () => {
  it('reports rows, the rule in words and fidelity to the recorded decisions, estimating nothing', () => {
    const r = cli('check', SAMPLE);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/20,002 rows read, 19,997 usable, 5 excluded/);
    expect(r.stdout).toMatch(/Recorded decisions: .* agree with the formula/);
    expect(r.stdout).toMatch(/A household is eligible if/);
  });
});

describe('--help', () => {
  it.each([
    ['evaluate', /^Usage: npm run --silent cli -- evaluate <study\.json> --out <dir>/, /--deltas .*--draws .*--seed .*--formats .*--workspace .*--workers .*--quiet/s],
    ['check', /^Usage: npm run --silent cli -- check <study\.json>/, /estimating anything/],
    ['demo', /^Usage: npm run --silent cli -- demo --out <dir>/, /sample-programs\/winter-credit/],
  ])('%s --help prints that command\'s usage on stdout and exits 0', (command, head, body) => {
    // `-h` and `help <command>` for one command each, to keep the file quick
    const forms = command === 'check' ? [[command, '--help'], [command, '-h']] : command === 'demo' ? [[command, '--help'], ['help', command]] : [[command, '--help']];
    for (const args of forms) {
      const r = cli(...args);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout).toMatch(head);
      expect(r.stdout).toMatch(body);
      expect(r.stdout).toMatch(/Exit status: 0 done; 2 the input is wrong/);
      expect(r.stderr).toBe('');
    }
  });

  it('--help alone prints the list of commands; an unknown command with --help is refused', () => {
    const all = cli('--help');
    expect(all.code).toBe(0);
    for (const c of ['evaluate', 'check', 'demo']) expect(all.stdout).toContain(`cli -- ${c}`);
    const bad = cli('estimate', '--help');
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/"estimate" is not a command/);
  });
});

describe('progress on stderr', () => {
  /** A stream that records what is written to it and says it is (or is not) a terminal. */
  function recorder(isTTY: boolean) {
    const chunks: string[] = [];
    const stream = new Writable({ write(chunk, _enc, done) { chunks.push(String(chunk)); done(); } }) as Writable & { isTTY: boolean; columns: number };
    stream.isTTY = isTTY;
    stream.columns = 100;
    return { stream: stream as unknown as NodeJS.WriteStream, text: () => chunks.join('') };
  }
  const events = [
    { stage: 'import', done: 0, total: 200 }, { stage: 'import', done: 50, total: 200 }, { stage: 'import', done: 200, total: 200 },
    { stage: 'propensity', done: 0, total: 10 }, { stage: 'propensity', done: 4, total: 10 },
    { stage: 'estimate', done: 0, total: 1 },
  ];

  it('draws a bar per stage on a terminal, redrawn in place, each closed at 100%', () => {
    const out = recorder(true);
    const printer = progressPrinter(out.stream, { tty: true });
    for (const e of events) printer(e);
    printer.finish();
    const text = out.text();
    expect(text).toMatch(/Reading the data\s+\S+ 100%/);
    // the propensity stage handed over to the next one: its bar is closed full
    expect(text).toMatch(/Computing propensity scores\s+\S+ 100%/);
    expect(text).toMatch(/Estimating/);
    expect(text).toMatch(/\u001b\[/); // terminal control sequences: the bar is redrawn, not appended
  });

  it('writes plain lines, one per tenth, when stderr is not a terminal; nothing with --quiet', () => {
    const out = recorder(false);
    const printer = progressPrinter(out.stream);
    for (const e of events) printer(e);
    printer.finish();
    expect(out.text()).toBe('Reading the data: 0%\nReading the data: 25%\nReading the data: 100%\nComputing propensity scores: 0%\nComputing propensity scores: 40%\nEstimating: 0%\n');
    const quiet = recorder(false);
    const silent = progressPrinter(quiet.stream, false);
    for (const e of events) silent(e);
    expect(quiet.text()).toBe('');
  });

  it('prints plain progress lines from the command line when stderr is a pipe', () => {
    const r = cli('check', SAMPLE);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/^Reading the data: \d+%$/m);
    expect(r.stderr).not.toMatch(/\u001b\[/);
  });
});

describe('fenceline demo', () => {
  it('runs the bundled sample study end to end', () => {
    const out = tmp();
    const r = cli('demo', '--out', out, '--formats', 'none');
    expect(r.code, r.stderr).toBe(0);
    expect(existsSync(join(out, 'results.json'))).toBe(true);
  });
});
