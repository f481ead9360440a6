// The command line end to end, as a user runs it (docs/cli.md): exit codes, messages, the files
// it writes, and byte-identical results for the same study, data and seed.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync, copyFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = join(__dirname, '../..');
const SAMPLE = join(ROOT, 'sample-programs/winter-credit/study.json');

function cli(...args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(ROOT, 'main/cli.ts'), ...args], { cwd: ROOT, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
const tmp = () => mkdtempSync(join(tmpdir(), 'fenceline-cli-'));

/** A copy of the sample study in a temp folder, changed by `edit`, with its data beside it. */
function studyCopy(edit: (s: any) => void, data?: (csv: string) => string): string {
  const dir = tmp();
  const s = JSON.parse(readFileSync(SAMPLE, 'utf8'));
  edit(s);
  writeFileSync(join(dir, 'study.json'), JSON.stringify(s, null, 2));
  const csv = readFileSync(join(ROOT, 'sample-programs/winter-credit/applicants.csv'), 'utf8');
  writeFileSync(join(dir, 'applicants.csv'), data ? data(csv) : csv);
  return join(dir, 'study.json');
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

  it('counts every excluded row with its reason and spreadsheet row', () => {
    const path = studyCopy(() => {}, (csv) => {
      const lines = csv.split('\r\n');
      lines[5] = lines[5]!.replace(/^(A-\d+),\d+,/, '$1,n/a,'); // HH_INCOME not a number on spreadsheet row 6
      return lines.join('\r\n');
    });
    const out = tmp();
    const res = cli('evaluate', path, '--out', out, '--formats', 'none', '--draws', '200');
    expect(res.code, res.stderr).toBe(0);
    const r = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8'));
    expect(r.study.rowsUsed).toBe(r.study.rowsRead - 1);
    expect(r.study.rowsExcluded).toEqual([expect.objectContaining({ count: 1, rows: [6] })]);
    expect(r.study.rowsExcluded[0].reason).toMatch(/HH_INCOME/);
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
    expect(r.stdout).toMatch(/20,000 rows read/);
    expect(r.stdout).toMatch(/Recorded decisions: .* agree with the formula/);
    expect(r.stdout).toMatch(/A household is eligible if/);
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
