// One run, one truth (issue 9 §2): for every sample program in sample-programs/, run once
// in-process, the Evidence screen's logic (app/lib/evidence.ts), the memo (main/report/model) and
// the command-line summary state the same verdicts — the effect, the design kind, instrument
// strength, balance and sorting — because all three word results.findings. The memo's verdicts
// are read back from its document (the "Verdict: …" labels and the key finding's words).

import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { balanceVerdict, compositionVerdict, effectVerdict, instrumentVerdict, manipulationVerdict } from '../../app/lib/evidence.ts';
import { formatEvaluateSummary } from '../../main/cli/summaries.ts';
import type { Results } from '../../main/contract/results.ts';
import { runStudy } from '../../main/pipeline/run-study.ts';
import { figureData } from '../../main/report/figure-data.ts';
import type { Document, Section } from '../../main/report/model/document.ts';
import { runsText } from '../../main/report/model/format.ts';
import { buildMemo } from '../../main/report/model/memo.ts';
import { suppressionLegend } from '../../main/report/model/suppress.ts';
import { loadStudyFile } from '../../main/studyfile/load.ts';

const ROOT = join(__dirname, '../..');
const FOLDERS = readdirSync(join(ROOT, 'sample-programs'), { withFileTypes: true }).filter((d) => d.isDirectory()).map((d) => d.name).sort();

interface Case { results: Results; memo: Document; summary: string }
const cases = new Map<string, Case>();

beforeAll(async () => {
  for (const folder of FOLDERS) {
    const loaded = loadStudyFile(join(ROOT, 'sample-programs', folder, 'study.json'));
    if (!loaded.ok) throw new Error(JSON.stringify(loaded.problems));
    const study = { ...loaded.value.study, settings: { ...loaded.value.study.settings, draws: 1000 } };
    const run = await runStudy(study, { baseDir: loaded.value.baseDir, workers: 0 });
    if (!run.ok) throw new Error(JSON.stringify(run.problems));
    const results: Results = JSON.parse(JSON.stringify(run.value.results));
    const memo = buildMemo(results, figureData(run.value), { createdAt: '2025-03-12T09:30:00Z' });
    cases.set(folder, { results, memo, summary: formatEvaluateSummary({ outDir: '/tmp/x', files: [], results, runId: null, studySha256: '', timings: {} }) });
  }
}, 300_000);

function allSections(doc: Document): Section[] {
  const out: Section[] = [];
  const visit = (s: Section) => { out.push(s); (s.sections ?? []).forEach(visit); };
  doc.sections.forEach(visit);
  return out;
}
function sectionText(doc: Document, id: string): string {
  const s = allSections(doc).find((x) => x.id === id);
  if (!s) return '';
  const legend = suppressionLegend(10);
  return s.blocks.map((b) => {
    if (b.kind === 'paragraph') return runsText(b.runs, legend);
    if (b.kind === 'list') return b.items.map((i) => runsText(i, legend)).join(' ');
    if (b.kind === 'keyFinding') return [b.title, ...b.body.map((p) => (p.kind === 'paragraph' ? runsText(p.runs, legend) : p.kind === 'list' ? p.items.map((i) => runsText(i, legend)).join(' ') : ''))].join(' ');
    if (b.kind === 'note') return b.body.map((p) => runsText(p.runs, legend)).join(' ');
    return '';
  }).join(' ');
}
const memoLabel = (doc: Document, id: string) => /Verdict: ([^.]+)\./.exec(sectionText(doc, id))?.[1] ?? null;

describe.each(FOLDERS)('sample program %s: the screen, the memo and the summary agree', (folder) => {
  const c = () => cases.get(folder)!;

  it('on the effect of each outcome', () => {
    const { results: r, memo, summary } = c();
    const key = sectionText(memo, 'key-finding');
    r.outcomes.forEach((o, i) => {
      const screen = effectVerdict(r, o).finding;
      expect(screen).toBe(r.findings.outcomes[i]!.effect);
      if (r.outcomes.length === 1) {
        expect(key.includes('can tell this effect apart from no effect'), key).toBe(screen === 'distinguishable');
        expect(key.includes('cannot tell this effect apart'), key).toBe(screen === 'not distinguishable');
      }
      expect(summary).toContain(`  ${screen}: `);
    });
  });

  it('on the design the estimate comes from', () => {
    const { results: r, memo, summary } = c();
    const kind = compositionVerdict(r).finding;
    expect(kind).toBe(r.findings.design.kind);
    const key = sectionText(memo, 'key-finding');
    const who = sectionText(memo, 'who');
    if (kind === 'edge') expect(key).toContain('just inside the limits of the rule');
    else expect(key).not.toContain('just inside the limits of the rule with');
    if (kind === 'edge and lottery') expect(key).toContain('rests on two comparisons');
    if (kind === 'lottery') expect(key).toContain('offered the benefit by the draw');
    // "Mostly" near one limit only when that limit holds more than half of the units compared.
    const comp = r.design.composition[r.headline.index]!;
    const top = Math.max(...comp.atoms.map((a) => a.share));
    expect(who.includes('speaks mostly for') && who.includes('near that limit.'), who).toBe(kind === 'edge' && top > 0.5);
    if (kind === 'edge' && top <= 0.5) expect(who).toContain('No one limit holds most of them');
    expect(summary).toContain(`Design: ${kind}`);
  });

  it('on instrument strength, balance and sorting', () => {
    const { results: r, memo, summary } = c();
    if (r.estimand.kind === 'treatment') expect(memoLabel(memo, 'check-instrument')).toBe(instrumentVerdict(r).finding);
    if (r.balance.length) expect(memoLabel(memo, 'check-balance')).toBe(balanceVerdict(r).finding);
    if (r.density.length) expect(memoLabel(memo, 'check-density')).toBe(manipulationVerdict(r).finding);
    expect(summary).toContain(`Instrument: ${instrumentVerdict(r).finding}`);
    expect(summary).toContain(`Balance: ${balanceVerdict(r).finding}`);
    expect(summary).toContain(`Sorting at the limits: ${manipulationVerdict(r).finding}`);
  });
});

describe('tutoring-lottery is worded as a lottery estimate, not as one local to the edge', () => {
  it('states both kinds with their shares', () => {
    const r = cases.get('tutoring-lottery')!.results;
    expect(r.findings.design.kind).toBe('edge and lottery');
    expect(r.findings.design.lotteryShare).toBeGreaterThan(0.5);
    expect(sectionText(cases.get('tutoring-lottery')!.memo, 'limits')).toContain('whose offer was left to the draw');
  });
});
