// The boundary-region map as the app's Map screen draws it: the chart spec (the memo's own,
// model/map-spec.ts) and the note under it, from the map's data (boundary-map.ts).

import type { BoundaryMapData } from './model/figure-types.ts';

export { mapSpec } from './model/map-spec.ts';

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
