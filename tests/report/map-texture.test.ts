// The map's offer probability is read from shape as well as lightness (WCAG 2.1 success criterion
// 1.4.1, "Use of Color": colour is not the only visual means of conveying information): plain
// cells where no one is offered, plus signs where the offer is a chance, dots where it is certain;
// the legend shows the same marks.

import { describe, expect, it } from 'vitest';
import { chartConfig, offerTexture } from '../../main/report/charts/config.ts';
import { figuresOf } from '../../main/report/render/figures.ts';
import { sampleDocument } from './sample-document.ts';

describe('the boundary map codes the offer probability by pattern too', () => {
  it('maps 0, a chance and 1 to three different patterns', () => {
    expect([0, 0.25, 0.5, 0.6, 0.999, 1].map(offerTexture)).toEqual(['none', 'plus', 'plus', 'plus', 'plus', 'dot']);
  });
  it('hands the grid plugin a texture for every cell and gives the legend three different shapes', () => {
    const spec = figuresOf(sampleDocument().doc).map((f) => f.chart).find((s) => s.kind === 'boundaryMap');
    expect(spec).toBeDefined();
    if (spec?.kind !== 'boundaryMap') return;
    const cfg = chartConfig(spec) as unknown as { data: { datasets: Array<{ label: string; pointStyle?: string }> } };
    const legend = cfg.data.datasets.filter((d) => /^Offer probability/.test(d.label));
    expect(legend).toHaveLength(3);
    expect(new Set(legend.map((d) => d.pointStyle)).size).toBe(3);
    const texture = spec.grid.probability.map((row) => row.map(offerTexture));
    expect(texture.flat()).toContain('dot');
    expect(texture.flat()).toContain('none');
  });
});
