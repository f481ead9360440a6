// The boundary-region map as the app's Map screen draws it: the chart spec (the memo's own, from
// main/report/charts) and the note under it, from the map's data (boundary-map.ts).

import type { BoundaryMapSpec } from './charts/spec.ts';
import type { BoundaryMapData } from './model/figure-types.ts';

export function mapSpec(map: BoundaryMapData): BoundaryMapSpec {
  return {
    kind: 'boundaryMap',
    title: 'Where the edge of the rule runs',
    ...(map.panel || map.heldFixed.length ? { subtitle: [map.panel, ...map.heldFixed].filter(Boolean).join(' · ') } : {}),
    x: { label: map.x.label, ...(map.x.unit ? { unit: map.x.unit } : {}) },
    y: { label: map.y.label, ...(map.y.unit ? { unit: map.y.unit } : {}) },
    grid: map.grid,
    delta: map.delta,
    ...(map.view === 'binned' ? { counts: map.counts } : { units: { offered: map.units.offered, notOffered: map.units.notOffered } }),
  };
}

export function mapNote(map: BoundaryMapData): string | null {
  const held = [map.panel ?? '', ...map.heldFixed];
  if (map.heldFixed.length) held.push(`the shading and the band hold the other continuous input${map.heldFixed.length > 1 ? 's' : ''} at the median named`);
  const sentences = [held.filter(Boolean).join('; ')];
  if (map.view === 'units') {
    const u = map.units;
    sentences.push(`Private view: each mark is one unit of this cell${map.heldFixed.length ? ', whatever its other inputs' : ''} (triangles offered, circles not offered)${u.drawn < u.total ? `; an even sample of ${u.drawn.toLocaleString('en-US')} of ${u.total.toLocaleString('en-US')} units is drawn` : ''}. It is never put in the memo or exported files`);
  }
  const text = sentences.filter(Boolean).join('. ');
  return text ? `${text}.` : null;
}
