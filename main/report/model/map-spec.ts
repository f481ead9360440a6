// The chart spec of the boundary-region map, from the map's data: one builder for the memo's
// figure (binned counts) and the app's Map screen (binned, or the private per-unit view).

import type { BoundaryMapSpec } from '../charts/spec.ts';
import type { BoundaryMapData } from './figure-types.ts';

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
