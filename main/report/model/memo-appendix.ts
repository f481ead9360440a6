// Section 9 (technical appendix: method and formulas with their published sources — the same
// sources as docs/method.md —, settings, seed, software version, data hash, every warning) and
// the glossary of the terms the memo uses.

import type { GlossaryEntry, Section, TableRow } from './document.ts';
import type { MemoContext } from './memo-context.ts';
import { COUNT, DELTA, upperFirst } from './memo-format.ts';
import { shareableText } from './memo-scrub.ts';
import { numCell, stateCell, text, textCell } from './memo-source.ts';

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
  'Lee, D. S. and Card, D. (2008). Regression discontinuity inference with specification error. Journal of Econometrics 142(2):655–674.',
];

function methodBlocks(ctx: MemoContext): Section['blocks'] {
  const { r } = ctx;
  const se = r.settings.variance === 'CR1'
    ? `cluster-robust standard errors (CR1) with ${r.settings.clusterColumn ?? 'the cluster column'} as the cluster`
    : 'heteroskedasticity-robust standard errors (HC1; MacKinnon and White 1985)';
  return [
    { kind: 'paragraph', runs: [text('Design. ', 'bold'), text('For each unit the approximate propensity score (APS) p(x; δ) is the average of the rule’s offer probability A over the Euclidean ball of radius δ around the unit’s continuous inputs, in scaled units (each input divided by its scale), the discrete inputs held fixed (Narita and Yata 2021). Fenceline computes it exactly where the geometry allows (one straddled linear criterion, or parallel ones: the fraction of the ball beyond a plane at distance t·δ is ½·I₁₋ₜ²((d+1)/2, ½), Li 2011) and otherwise by randomized quasi-Monte Carlo points in the ball, with a simulation standard error from independent replicates.')] },
    { kind: 'paragraph', runs: [text('Estimate. ', 'bold'), text(`In the units with 0 < APS < 1 (strictly), two-stage least squares of the outcome Y on receipt D, instrumented by the offer Z, controlling for the APS: first stage D = γ₀ + γ₁·Z + γ₂·APS + ν, second stage Y = β₀ + β₁·D + β₂·APS + ε; the effect is β₁ = ρ₁/γ₁, ρ₁ the offer’s coefficient in the reduced form of Y. Standard errors: ${se}. Intervals are 95% Wald intervals.`)] },
    { kind: 'paragraph', runs: [text('Weak instruments. ', 'bold'), text('The first-stage F is the squared robust t-statistic of γ₁ (rule of thumb: weak below ten, Staiger and Stock 1997). The tF interval widens the critical value as F falls (Lee, McCrary, Moreira and Porter 2022); the Anderson–Rubin set inverts the robust test of the reduced form in Y − β·D and may be unbounded (Mikusheva 2010).')] },
    { kind: 'paragraph', runs: [text('Checks. ', 'bold'), text('Balance: each covariate regressed on Z and the APS near the edge; the standardized difference divides the coefficient by √((s₁² + s₀²)/2) (Austin 2009); the joint test is a robust Wald test of all coefficients. Density: McCrary’s (2008) test of a jump in the density of value − limit at zero, log difference θ = ln f⁺ − ln f⁻. Delta sensitivity: pairs of deltas whose 95% intervals do not overlap (Schenker and Gentleman 2001). Several outcomes: Holm (1979) adjusted p-values. Compliers: Abadie’s (2003) κ-weighted means with the APS as the offer probability. Threshold changes: the offer change S times ρ₁ (outcome total) and γ₁ (receipt), supported only while every unit switched has 0 < APS < 1.')] },
    { kind: 'paragraph', runs: [text('Figures. ', 'bold'), text('The distance to the nearest edge is, for each unit, the smallest distance in scaled units to the plane of a criterion whose reversal alone would reverse the verdict, counted negative on the not-eligible side (docs/memo.md). Figures use per-unit data but print no number; counts in them are suppressed like every table.')] },
    { kind: 'paragraph', runs: [text('Estimand. ', 'bold'), text(r.estimand.note + ' ' + r.instrument.note + (r.localLinearNote ? ' ' + r.localLinearNote : ''))] },
    { kind: 'list', items: METHOD_SOURCES.map((s) => [text(s)]) },
  ];
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
    { cells: [textCell('Standard errors'), textCell(s.variance === 'CR1' ? `CR1, clustered by ${s.clusterColumn ?? ''}` : 'HC1')] },
    { cells: [textCell('Bound on a simulated APS’s standard deviation'), numCell(r, 'design.mcSdBound', { style: 'decimal', decimals: 4 })] },
  );
  return rows;
}

export function appendixSection(ctx: MemoContext): Section {
  const { r, ledger } = ctx;
  const warnings = r.warnings.map((w) => [text(`${w.code}: `, 'bold'), text(shareableText(w.message, ledger.threshold, [ctx.words.one, ctx.words.many]))]);
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
        e('95% interval', 'The range of effects the data cannot tell apart from the estimate. If it includes zero, the result is consistent with no effect.'),
        e('Near the edge (boundary units)', `${upperFirst(many)} whose inputs are so close to a limit of the rule that a small difference would change the verdict: those with an offer probability strictly between zero and one at a given delta.`),
        e('Delta', `The radius of the small neighbourhood around each ${one}’s inputs, in scaled units. Larger deltas count more ${many} as near the edge.`),
        e('Scaled units', 'Each continuous input divided by its scale (listed in the appendix), so that distances along different inputs can be compared.'),
        e('Offer probability (approximate propensity score, APS)', `The chance that the rule would offer the benefit to a ${one} whose inputs lay anywhere in the neighbourhood: the average of the rule’s offer over it.`),
        e('Compliers', `${upperFirst(many)} who take the benefit when offered and would not take it otherwise. The estimate is the effect for compliers near the edge.`),
        e('First stage', 'How much an offer raises the share receiving the benefit.'),
        e('F statistic', 'How clearly the first stage stands out from noise; small values make the usual interval unreliable.'),
        e('tF interval, Anderson–Rubin set', 'Intervals for the effect that stay valid when the first stage is weak.'),
        e('Two-stage least squares (2SLS)', 'The regression that turns the offer’s effect on the outcome into the effect of receiving the benefit, by dividing by the first stage.'),
        e('Naive comparison', `The difference in the outcome between all ${many} who received the benefit and all who did not, with no adjustment.`),
        e('Selection', `Differences between the ${many} who receive a benefit and those who do not that would exist without it.`),
        e('Standardized difference', 'A difference between two groups divided by the typical spread of the characteristic.'),
        e('p-value', 'How often chance alone would give a result at least this far from none; small values mean chance is an unlikely explanation.'),
        e('Density test', 'A check for more units just on one side of a limit than just on the other.'),
        e('Overrides', 'Recorded decisions that differ from what the formula says.'),
        e('HC1, CR1', 'Ways of computing standard errors that allow for unequal variances (HC1) or for correlated units within a cluster (CR1).'),
        e('Small-cell suppression', 'Counts small enough to identify people are hidden, and so is anything from which they could be worked out.'),
      ],
    }],
  };
}
