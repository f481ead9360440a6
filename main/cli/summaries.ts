// What the command line prints on stdout: a short plain-text summary of a check or a run.

import type { CheckReport, EvaluateReport } from '../contract/api.ts';

const n = (v: number) => v.toLocaleString('en-US');
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
  for (const o of res.outcomes) {
    lines.push(`${o.label}:`);
    for (const d of o.byDelta) {
      lines.push(d.estimable
        ? `  delta ${d.delta}: ${fmt(d.estimate)} (95% CI ${fmt(d.ci?.[0])} to ${fmt(d.ci?.[1])}), n = ${n(d.n)}, first-stage F ${fmt(d.firstStage?.F ?? null, 1)}`
        : `  delta ${d.delta}: not estimable (n = ${n(d.n)})`);
    }
    lines.push(`  naive OLS over all units: ${fmt(o.naiveOls.estimate)}; IV without the APS control: ${fmt(o.ivNoControl.estimate)}`);
  }
  if (res.warnings.length) lines.push(`${res.warnings.length} warning${res.warnings.length > 1 ? 's' : ''} (see results.json):`, ...res.warnings.slice(0, 8).map((w) => `  - ${w.message}`));
  lines.push(`Wrote ${r.files.length} files to ${r.outDir}${r.runId !== null ? ` (run ${r.runId} saved in the workspace)` : ''}.`);
  return lines.join('\n') + '\n';
}
