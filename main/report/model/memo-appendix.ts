// Section 9 (technical appendix: method and formulas with their published sources — the same
// sources as docs/method.md —, settings, seed, software version, data hash, every warning) and
// the glossary of the terms the memo uses.

import type { GlossaryEntry, Inline, Section, TableRow } from './document.ts';
import type { MemoContext } from './memo-context.ts';
import { COUNT, DELTA, effectOf, upperFirst, withColumnLabels } from './memo-format.ts';
import { shareableText } from './memo-scrub.ts';
import { constNum, num, numCell, stateCell, text, textCell } from './memo-source.ts';
import { MEMO_CONSTANTS } from './memo-constants.ts';
import { whoPhrase } from './memo-finding.ts';

/** Published sources of the methods the memo reports (docs/method.md). */
export const METHOD_SOURCES: readonly string[] = [
  'Narita, Y. and Yata, K. (2021). Algorithm is Experiment: Machine Learning, Market Design, and Policy Eligibility Rules. Working paper (later versions titled "Algorithm as Experiment").',
  'Staiger, D. and Stock, J. H. (1997). Instrumental variables regression with weak instruments. Econometrica 65(3):557–586.',
  'Lee, D. S., McCrary, J., Moreira, M. J. and Porter, J. (2022). Valid t-ratio inference for IV. American Economic Review 112(10):3260–3290.',
  'Mikusheva, A. (2010). Robust confidence sets in the presence of weak instruments. Journal of Econometrics 157(2):236–247.',
  'MacKinnon, J. G. and White, H. (1985). Some heteroskedasticity-consistent covariance matrix estimators with improved finite sample properties. Journal of Econometrics 29(3):305–325.',
  'McCrary, J. (2008). Manipulation of the running variable in the regression discontinuity design: a density test. Journal of Econometrics 142(2):698–714.',
  'Abadie, A. (2003). Semiparametric instrumental variable estimation of treatment response models. Journal of Econometrics 113(2):231–263.',
  'Imbens, G. and Kalyanaraman, K. (2012). Optimal bandwidth choice for the regression discontinuity estimator. Review of Economic Studies 79(3):933–959.',
  'Austin, P. C. (2009). Balance diagnostics for comparing the distribution of baseline covariates between treatment groups in propensity-score matched samples. Statistics in Medicine 28(25):3083–3107.',
  'Holm, S. (1979). A simple sequentially rejective multiple test procedure. Scandinavian Journal of Statistics 6(2):65–70.',
  'Schenker, N. and Gentleman, J. F. (2001). On judging the significance of differences by examining the overlap between confidence intervals. The American Statistician 55(3):182–186.',
  'Li, S. (2011). Concise formulas for the area and volume of a hyperspherical cap. Asian Journal of Mathematics and Statistics 4(1):66–70.',
  'Wasserstein, R. L. and Lazar, N. A. (2016). The ASA statement on p-values: context, process, and purpose. The American Statistician 70(2):129–133.',
  'Neyman, J. (1937). Outline of a theory of statistical estimation based on the classical theory of probability. Philosophical Transactions of the Royal Society A 236(767):333–380.',
  'Imbens, G. W. and Angrist, J. D. (1994). Identification and estimation of local average treatment effects. Econometrica 62(2):467–475.',
  'Anderson, T. W. and Rubin, H. (1949). Estimation of the parameters of a single equation in a complete system of stochastic equations. Annals of Mathematical Statistics 20(1):46–63.',
  'Cameron, A. C. and Miller, D. L. (2015). A practitioner’s guide to cluster-robust inference. Journal of Human Resources 50(2):317–372.',
  'Rubin, D. B. (2001). Using propensity scores to help design observational studies: application to the tobacco litigation. Health Services and Outcomes Research Methodology 2(3–4):169–188.',
  'Cameron, A. C., Gelbach, J. B. and Miller, D. L. (2008). Bootstrap-based improvements for inference with clustered errors. Review of Economics and Statistics 90(3):414–427.',
  'Davidson, R. and MacKinnon, J. G. (2010). Wild bootstrap tests for IV regression. Journal of Business and Economic Statistics 28(1):128–144.',
  'Webb, M. D. (2023). Reworking wild bootstrap-based inference for clustered errors. Canadian Journal of Economics 56(3):839–858.',
  'Angrist, J. D. and Pischke, J.-S. (2009). Mostly Harmless Econometrics: An Empiricist’s Companion. Princeton University Press.',
  'Lee, D. S. and Card, D. (2008). Regression discontinuity inference with specification error. Journal of Econometrics 142(2):655–674.',
];

function methodBlocks(ctx: MemoContext): Section['blocks'] {
  return [
    { kind: 'paragraph', runs: [text('Design. ', 'bold'), text(designSentence(ctx.r))] },
    { kind: 'paragraph', runs: [text('Estimate. ', 'bold'), text(`In the units with 0 < APS < 1 (strictly), two-stage least squares of the outcome Y on receipt D, instrumented by the offer Z, controlling for the APS: first stage D = γ₀ + γ₁·Z + γ₂·APS + ν, second stage Y = β₀ + β₁·D + β₂·APS + ε; the effect is β₁ = ρ₁/γ₁, ρ₁ the offer’s coefficient in the reduced form of Y. ${inferenceSentence(ctx.r)}`)] },
    { kind: 'paragraph', runs: [text('Weak instruments. ', 'bold'), text('The first-stage F is the squared robust t-statistic of γ₁ (rule of thumb: weak below ten, Staiger and Stock 1997). The tF interval widens the critical value as F falls and is the one to read below F = 104.7 (Lee, McCrary, Moreira and Porter 2022); the Anderson–Rubin set inverts the robust test of the reduced form in Y − β·D and may be unbounded (Mikusheva 2010). An effect is called distinguishable from no effect only when every interval that applies excludes zero.')] },
    { kind: 'paragraph', runs: [text('Checks. ', 'bold'), text(`Balance: each covariate regressed on Z and the APS in the units compared; the standardized difference divides the coefficient by √((s₁² + s₀²)/2) (Austin 2009) and is flagged beyond 0.25 whatever its p-value (Rubin 2001); the p-values of all per-characteristic tests at every delta are adjusted together (Holm 1979), and the joint test is a robust Wald test of all coefficients at each delta. Density: McCrary’s (2008) test of a jump in the density of value − limit at zero, log difference θ = ln f⁺ − ln f⁻; p below 0.05 is a sign of sorting, p from 0.05 to 0.10 a weak sign. Delta sensitivity: the estimates at the several deltas are shown side by side and not tested against each other, because the smaller samples are part of the larger ones (overlap of intervals would prove little; Schenker and Gentleman 2001). Several outcomes: Holm (1979) adjusted p-values. ${complierSentence(ctx.r)} Threshold changes: the offer change S times ρ₁ (outcome total) and γ₁ (receipt), supported only while every unit switched has 0 < APS < 1.`)] },
    { kind: 'paragraph', runs: [text('Figures. ', 'bold'), text('The distance to the nearest edge is, for each unit, the smallest distance in scaled units to the plane of a criterion whose reversal alone would reverse the verdict, counted negative on the not-eligible side (docs/memo.md). Figures use per-unit data but print no number; counts in them are suppressed like every table.')] },
    { kind: 'paragraph', runs: estimandRuns(ctx) },
    { kind: 'list', items: METHOD_SOURCES.map((s) => [text(s)]) },
  ];
}

/** How the APS was computed in this run, from its design counts. */
function designSentence(r: MemoContext['r']): string {
  const corners = r.design.byDelta.some((d) => d.cornerExact > 0);
  const simulated = r.design.byDelta.some((d) => d.simulated > 0);
  const refined = r.design.byDelta.some((d) => d.refined > 0);
  const parts = [
    'For each unit the approximate propensity score (APS) p(x; δ) is the average of the rule’s offer probability A over the Euclidean ball of radius δ around the unit’s continuous inputs, in scaled units (each input divided by its scale), the discrete inputs held fixed (Narita and Yata 2021).',
    'Fenceline computes it exactly where one linear criterion, or parallel ones, cross the ball (the fraction of the ball beyond a plane at distance t·δ is ½·I₁₋ₜ²((d+1)/2, ½), Li 2011)' +
      (corners ? ', and where two or three linear criteria cross it (an integral of the ball’s marginal density over the region the criteria cut out, to a stated error)' : '') + '.',
  ];
  if (simulated) {
    parts.push('Elsewhere it averages the offer over randomized quasi-Monte Carlo points in the ball, with a simulation standard error from independent replicates' +
      (refined ? '; a unit whose ball crosses the edge but whose simulated value came out exactly 0 or 1 was given more points' : '') + '.');
  } else {
    parts.push('In this run no unit needed simulation.');
  }
  return parts.join(' ');
}

/** Standard errors and the reference distribution of this run's intervals. */
function inferenceSentence(r: MemoContext['r']): string {
  if (r.settings.variance !== 'CR1') return 'Standard errors: heteroskedasticity-robust (HC1; MacKinnon and White 1985). Intervals are 95% Wald intervals with normal critical values.';
  const few = r.outcomes.some((o) => o.byDelta.some((b) => b.wildBootstrap));
  return 'Standard errors: cluster-robust (CR1; Cameron and Miller 2015), clustered by the study’s cluster column. Intervals and tests use critical values of Student’s t with G − 1 degrees of freedom, G the number of clusters in the sample (common practice; Cameron, Gelbach and Miller 2008).' +
    (few ? ' With fewer than 50 clusters the headline delta also has a wild cluster bootstrap: the restricted efficient wild bootstrap for IV (Davidson and MacKinnon 2010) with Rademacher weights, or Webb’s six-point weights below 12 clusters (Webb 2023); its p-value and interval come from inverting the bootstrap test, with a fixed seed.' : '');
}

/** How the complier profile was estimated in this run. */
function complierSentence(r: MemoContext['r']): string {
  const kappa = r.compliers.some((c) => c.method === 'kappa');
  const tsls = r.compliers.some((c) => c.method === '2SLS');
  const parts: string[] = [];
  if (tsls) parts.push('Compliers: their share is the first stage γ₁ of the headline specification; the compliers’ mean of a characteristic W is the coefficient on D in the same 2SLS with W·D as the outcome (Angrist and Pischke 2009; Abadie 2003 for the identity), with the same weighting as the effect.');
  if (kappa) parts.push('Where the offer probability is known and strictly between 0 and 1 (a stated lottery), the complier profile uses Abadie’s (2003) κ weights with that probability.');
  return parts.join(' ');
}

/** The estimand in the memo's own words: the analyst's column names stay in results.json. */
function estimandRuns(ctx: MemoContext): Inline[] {
  const { r } = ctx;
  const runs: Inline[] = [text('Estimand. ', 'bold')];
  if (r.estimand.kind === 'treatment') {
    runs.push(text(`The estimate is the effect of ${effectOf(r)} for the ${ctx.words.many} ${whoPhrase(ctx)} who receive it when offered and not otherwise (compliers)`));
    if (r.estimand.treatmentPer !== 1) runs.push(text(', per '), num(r, 'estimand.treatmentPer', { style: 'decimal', decimals: 0 }), text(' of the benefit received'));
    runs.push(text('. '));
  } else {
    runs.push(text('No column of who received the benefit was given, so the estimate is the effect of being offered the benefit (the reduced form); there is no first stage. '));
  }
  runs.push(text(r.instrument.source === 'formula'
    ? 'The offer is the rule’s own verdict, computed from the inputs; recorded decisions that differ are reported as overrides.'
    : 'The offer is the recorded decision.'));
  if (r.localLinearNote) runs.push(text(' The cross-check with one running variable uses local-linear regression (Imbens and Kalyanaraman 2012).'));
  return runs;
}

/** Which files hold unit-level data, and which are meant for others. */
export function filesParagraph(): Section['blocks'][number] {
  return {
    kind: 'paragraph',
    runs: [
      text('Files and who may see them. ', 'bold'),
      text('This memo (PDF, HTML, Word) and tables.xlsx are written to be shared: small counts are hidden in them. results.json, units.csv and the app’s Evidence screen hold unit-level data — row numbers, IDs, exact small counts and every unit’s inputs — and are the analyst’s own working files: do not share them with anyone not entitled to see the data.'),
    ],
  };
}

function settingsRows(ctx: MemoContext): TableRow[] {
  const { r } = ctx;
  const s = r.settings;
  const rows: TableRow[] = s.deltas.map((_, k) => ({ cells: [textCell(k === 0 ? 'Deltas (neighbourhood radius, scaled units)' : ''), numCell(r, `settings.deltas[${k}]`, DELTA)] }));
  rows.push(
    { cells: [textCell('Draws asked for per unit (simulated units only)'), numCell(r, 'settings.draws', COUNT)] },
    { cells: [textCell('Draws used per unit'), numCell(r, 'settings.drawsUsed', COUNT)] },
    { cells: [textCell('Independent replicates'), numCell(r, 'settings.replicates', COUNT)] },
    { cells: [textCell('Seed'), numCell(r, 'settings.seed', COUNT)] },
    { cells: [textCell('Small-cell threshold (counts from one up to it are hidden)'), numCell(r, 'settings.smallCellMax', COUNT)] },
    { cells: [textCell('Standard errors'), textCell(s.variance === 'CR1' ? `CR1, clusters: ${s.clusterColumn ?? ''}` : 'HC1')] },
    { cells: [textCell('Bound on a simulated APS’s standard deviation'), numCell(r, 'design.mcSdBound', { style: 'decimal', decimals: 4 })] },
  );
  return rows;
}

export function appendixSection(ctx: MemoContext): Section {
  const { r, ledger } = ctx;
  const warnings = r.warnings.map((w) => [text(`${w.code}: `, 'bold'), text(withColumnLabels(r, shareableText(w.message, ledger.threshold, [ctx.words.one, ctx.words.many])))]);
  const provenance = [
    [text(`Software: Fenceline ${r.version}. Data: ${r.study.dataFile}${r.study.sheet ? `, sheet “${r.study.sheet}”` : ''}, SHA-256 ${r.study.dataSha256}.`)],
    ...r.study.joins.map((j) => [text(`Joined: ${j.source}, SHA-256 ${j.sha256}.`)]),
  ];
  return {
    id: 'appendix',
    heading: 'Technical appendix',
    pageBreakBefore: true,
    blocks: [],
    sections: [
      { id: 'appendix-method', heading: 'Method and sources', blocks: methodBlocks(ctx) },
      {
        id: 'appendix-settings',
        heading: 'Settings and provenance',
        blocks: [
          { kind: 'list', items: provenance },
          filesParagraph(),
          { kind: 'table', id: 'settings', caption: 'Settings of this run', sheetName: 'Settings', columns: [{ header: 'Setting', align: 'left', width: 3 }, { header: 'Value', align: 'right', width: 1.2 }], rows: settingsRows(ctx) },
          {
            kind: 'table', id: 'scales', caption: 'Scale of each continuous input (one scaled unit)', sheetName: 'Scales',
            columns: [{ header: 'Input', align: 'left', width: 1.5 }, { header: 'Column', align: 'left', width: 1.5 }, { header: 'Scale', align: 'right', format: { style: 'decimal', decimals: 2 } }, { header: 'From', align: 'left', width: 1.5 }],
            rows: r.scales.map((s, k) => ({ cells: [textCell(s.key), textCell(s.column), numCell(r, `scales[${k}].scale`), textCell(s.source === 'study' ? 'the study file' : 'the sample standard deviation')] })),
          },
          {
            kind: 'table', id: 'aps-methods', caption: 'How the propensity score was computed, per delta', sheetName: 'APS computation',
            columns: [
              { header: 'Delta', align: 'right', format: DELTA }, { header: 'Constant', align: 'right', format: COUNT }, { header: 'Exact', align: 'right', format: COUNT },
              { header: 'Simulated', align: 'right', format: COUNT }, { header: 'Largest simulation SE', align: 'right', format: { style: 'decimal', decimals: 4 } },
            ],
            rows: r.design.byDelta.map((d, k) => ({ cells: [
              numCell(r, `design.byDelta[${k}].delta`),
              stateCell(ledger.get(`design.byDelta[${k}].constant`), `design.byDelta[${k}].constant`),
              stateCell(ledger.get(`design.byDelta[${k}].exact`), `design.byDelta[${k}].exact`),
              stateCell(ledger.get(`design.byDelta[${k}].simulated`), `design.byDelta[${k}].simulated`),
              numCell(r, `design.byDelta[${k}].maxSimulationSe`),
            ] })),
          },
        ],
      },
      {
        id: 'appendix-warnings',
        heading: 'Warnings',
        blocks: warnings.length
          ? [{ kind: 'paragraph', runs: [text('Every warning of the run, in words (results.json, the analyst’s own file, keeps the counts; counts, rows and examples are left out here):')] }, { kind: 'list', items: warnings }]
          : [{ kind: 'paragraph', runs: [text('The run recorded no warnings.')] }],
      },
    ],
  };
}

export function glossarySection(ctx: MemoContext): Section {
  const { many, one } = ctx.words;
  const e = (term: string, definition: string): GlossaryEntry => ({ term, definition: [text(definition)] });
  return {
    id: 'glossary',
    heading: 'Glossary',
    blocks: [{
      kind: 'glossary',
      entries: [
        e('95% interval', 'A range computed by a method that, over many repetitions of the study, would contain the true effect in 95% of repetitions. It does not mean a 95% chance that this particular range holds the effect. If it includes zero, the data are consistent with no effect (Neyman 1937).'),
        e('Near the edge (boundary units)', `${upperFirst(many)} whose inputs are so close to a limit of the rule that a small difference would change the verdict: those with an offer probability strictly between zero and one at a given delta.`),
        e('Delta', `The radius of the small neighbourhood around each ${one}’s inputs, in scaled units. Larger deltas count more ${many} as near the edge.`),
        e('Scaled units', 'Each continuous input divided by its scale (listed in the appendix), so that distances along different inputs can be compared.'),
        e('Offer probability (approximate propensity score, APS)', `The chance that the rule would offer the benefit to a ${one} whose inputs lay anywhere in the small neighbourhood around its own: the average of the rule’s offer over that neighbourhood (Narita and Yata 2021).`),
        e('Compliers', `${upperFirst(many)} who take the benefit when offered and would not take it otherwise. With an offer as the instrument, the estimate is the average effect for the compliers among the ${many} ${whoPhrase(ctx)} (Imbens and Angrist 1994).`),
        e('First stage', 'How much an offer raises the share receiving the benefit.'),
        { term: 'F statistic', definition: [text('How clearly the first stage stands out from noise: the square of its t-statistic. Below '), constNum('WEAK_F', MEMO_CONSTANTS.WEAK_F, COUNT), text(' the offer is called a weak instrument and the usual interval can be misleading (Staiger and Stock 1997).')] },
        e('tF interval, Anderson–Rubin set', 'Intervals for the effect that stay valid when the first stage is weak: the tF interval widens the usual one as F falls (Lee, McCrary, Moreira and Porter 2022); the Anderson–Rubin set tests each possible effect directly and may be unbounded (Anderson and Rubin 1949).'),
        e('Two-stage least squares (2SLS)', 'The regression that turns the offer’s effect on the outcome into the effect of receiving the benefit: with one offer, the offer’s effect on the outcome divided by its effect on receiving the benefit (the first stage).'),
        e('Naive comparison', `The difference in the outcome between all ${many} who received the benefit and all who did not, with no adjustment.`),
        e('Selection', `Differences between the ${many} who receive a benefit and those who do not that would exist without it.`),
        e('Standardized difference', 'The difference in a characteristic’s average between two groups, divided by the pooled standard deviation of that characteristic (Austin 2009).'),
        e('p-value', 'The probability, if there were no effect and the statistical model’s assumptions held, of a result at least as far from no effect as the one observed. A small p-value says the data would be unusual if there were no effect. It is not the probability that chance alone produced the result, nor the probability that there is no effect, and it does not measure how large or important the effect is (Wasserstein and Lazar 2016).'),
        e('Density test', `A check for more ${many} just on one side of a limit than just on the other, as there would be if values were adjusted to meet it (McCrary 2008).`),
        e('Overrides', 'Recorded decisions that differ from what the formula says.'),
        e('HC1, CR1', 'Ways of computing standard errors that allow for unequal variances (HC1; MacKinnon and White 1985) or for correlated units within a cluster (CR1; Cameron and Miller 2015).'),
        e('Small-cell suppression', 'Counts small enough to identify people are hidden, and so is anything from which they could be worked out.'),
      ],
    }],
  };
}
