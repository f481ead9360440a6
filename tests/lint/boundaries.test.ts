// The layer lint (scripts/check-boundaries.mjs) on a copy of main/ with a planted back-edge or
// cycle: it must fail, naming the file; on the copy as it is, it must pass.

import { execFileSync } from 'node:child_process';
import { cpSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const script = join(import.meta.dirname, '../../scripts/check-boundaries.mjs');

function copyOfMain(): string {
  const dir = mkdtempSync(join(tmpdir(), 'fenceline-lint-'));
  cpSync(join(import.meta.dirname, '../../main'), join(dir, 'main'), { recursive: true });
  cpSync(join(import.meta.dirname, '../../app'), join(dir, 'app'), { recursive: true });
  return dir;
}

function lint(dir: string): { ok: boolean; output: string } {
  try {
    return { ok: true, output: execFileSync(process.execPath, [script, dir], { encoding: 'utf8', stdio: 'pipe' }) };
  } catch (e) {
    return { ok: false, output: String((e as { stderr?: string }).stderr ?? e) };
  }
}

describe('the layer lint', () => {
  it('passes on the code as it is', () => {
    expect(lint(copyOfMain())).toMatchObject({ ok: true });
  });
  it('fails on an estimator that imports the report layer (a back-edge)', () => {
    const dir = copyOfMain();
    writeFileSync(join(dir, 'main/estimate/planted.ts'), "import { figureData } from '../report/figure-data.ts';\nexport const x = figureData;\n");
    const r = lint(dir);
    expect(r.ok).toBe(false);
    expect(r.output).toMatch(/main\/estimate\/planted\.ts: imports '\.\.\/report\/figure-data\.ts'.*main\/estimate\/ may not import main\/report/);
  });
  it('fails on the data layer reaching into design, and on the store reaching into the pipeline', () => {
    const dir = copyOfMain();
    writeFileSync(join(dir, 'main/data/planted.ts'), "import type { ApsColumns } from '../design/aps.ts';\nexport type X = ApsColumns;\n");
    writeFileSync(join(dir, 'main/store/planted.ts'), "import type { StudyRun } from '../pipeline/run-study.ts';\nexport type X = StudyRun;\n");
    const r = lint(dir);
    expect(r.output).toMatch(/main\/data\/planted\.ts.*may not import main\/design/);
    expect(r.output).toMatch(/main\/store\/planted\.ts.*may not import main\/pipeline/);
  });
  it('fails on an import cycle inside one folder, type-only imports included', () => {
    const dir = copyOfMain();
    writeFileSync(join(dir, 'main/estimate/knot-a.ts'), "import type { B } from './knot-b.ts';\nexport type A = { b?: B };\n");
    writeFileSync(join(dir, 'main/estimate/knot-b.ts'), "import type { A } from './knot-a.ts';\nexport type B = { a?: A };\n");
    const r = lint(dir);
    expect(r.ok).toBe(false);
    expect(r.output).toMatch(/import cycle: main\/estimate\/knot-[ab]\.ts → main\/estimate\/knot-[ab]\.ts/);
  });
});
