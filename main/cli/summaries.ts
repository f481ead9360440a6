// What the command line prints on stdout: a short plain-text summary of a check or a run. The
// verdicts and the headline delta are read from results.findings and results.headline
// (main/report/findings), never recomputed here.

import type { CheckReport, EvaluateReport } from '../contract/api.ts';
import { countText } from '../data/count-text.ts';

const n = countText;
const pct = (v: number) => `${(100 * v).toFixed(0)}%`;
const fmt = (v: number | null | undefined, digits = 2) =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : v.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: digits });

export function formatCheckReport(r: CheckReport): string {
  const lines = [
    `${r.title}`,
    `Data: ${r.dataFile}${r.sheet ? ` › ${r.sheet}` : ''} — ${n(r.rowsRead)} rows read, ${n(r.rowsUsed)} usable, ${n(r.rowsRead - r.rowsUsed)} excluded.`,
  ];
  for (const e of r.rowsExcluded) lines.push(`  excluded: ${n(e.count)} — ${e.reason}${e.rows.length ? ` (${e.rows.length === 1 ? 'row' : 'rows'} ${e.rows.slice(0, 5).join(', ')}${e.count > 5 ? ', …' : ''})` : ''}`);
  for (const o of r.outcomesMissing) if (o.count) lines.push(`  outcome ${o.column}: missing for ${n(o.count)} units (left out of that outcome's estimates)`);
  lines.push(`Rule: ${r.ruleWording}`);
  lines.push(`Eligible by the formula: ${n(r.eligible)} of ${n(r.rowsUsed)}.`);
  if (r.fidelity) lines.push(`Recorded decisions: ${n(r.fidelity.agree)} of ${n(r.fidelity.compared)} agree with the formula; ${n(r.fidelity.disagree)} differ (${n(r.fidelity.offeredAgainstRule)} offered against it, ${n(r.fidelity.refusedAgainstRule)} not offered although eligible).`);
  for (const note of r.notes) lines.push(`Note: ${note.message}`);
  lines.push('The study and its data are ready to evaluate.');
  return lines.join('\n') + '\n';
}

export function formatEvaluateSummary(r: EvaluateReport): string {
  const res = r.results;
  const lines = [
    `${res.study.title}`,
    `${n(res.study.rowsUsed)} of ${n(res.study.rowsRead)} rows used; ${res.settings.variance} standard errors${res.settings.clusterColumn ? ` clustered by ${res.settings.clusterColumn}` : ''}.`,
  ];
  const f = res.findings;
  lines.push(`Headline delta ${res.headline.delta}: ${res.headline.why}.`);
  lines.push(f.design.kind === 'edge and lottery'
    ? `Design: edge and lottery (${pct(f.design.edgeShare)} of the units compared near a limit, ${pct(f.design.lotteryShare)} by the draw alone).`
    : `Design: ${f.design.kind}.`);
  res.outcomes.forEach((o, i) => {
    const of = f.outcomes[i];
    lines.push(`${o.label}:`);
    if (of) lines.push(`  ${of.effect}: ${of.because}.${of.clusters?.few ? ` Note: ${of.clusters.note}.` : ''}`);
    for (const d of o.byDelta) {
      lines.push(d.estimable
        ? `  delta ${d.delta}: ${fmt(d.estimate)} (95% CI ${fmt(d.ci?.[0])} to ${fmt(d.ci?.[1])}), n = ${n(d.n)}, first-stage F ${fmt(d.firstStage?.F ?? null, 1)}`
        : `  delta ${d.delta}: not estimable (n = ${n(d.n)})`);
    }
    lines.push(`  naive OLS over all units: ${fmt(o.naiveOls.estimate)}; IV without the APS control: ${fmt(o.ivNoControl.estimate)}`);
  });
  lines.push(`Instrument: ${f.instrument.verdict}${f.instrument.weakAt.length ? ` (first-stage F below 10 at delta ${f.instrument.weakAt.join(', ')})` : ''}.`);
  lines.push(`Balance: ${f.balance.verdict} (${f.balance.tests} tests of single characteristics and ${f.balance.jointTests} joint tests, Holm-adjusted${f.balance.flagged.length ? `; flagged: ${f.balance.flagged.map((x) => `${x.covariate} at delta ${x.delta}`).join(', ')}` : ''}).`);
  lines.push(`Sorting at the limits: ${f.manipulation.verdict} (${f.manipulation.tests} density test${f.manipulation.tests === 1 ? '' : 's'}, ${f.manipulation.ran} ran).`);
  if (f.fidelity.verdict !== 'not compared') lines.push(`Recorded decisions: ${f.fidelity.verdict}.`);
  if (res.warnings.length) lines.push(`${res.warnings.length} warning${res.warnings.length > 1 ? 's' : ''} (see results.json):`, ...res.warnings.slice(0, 8).map((w) => `  - ${w.message}`));
  lines.push(`Wrote ${r.files.length} files to ${r.outDir}${r.runId !== null ? ` (run ${r.runId} saved in the workspace)` : ''}.`);
  return lines.join('\n') + '\n';
}
