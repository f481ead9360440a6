// Small chart.js plugins that draw what chart.js has no dataset type for: reference lines and bands,
// interval whiskers, and the boundary map's shaded grid. They draw on the chart's own 2-D context,
// so they work the same in the app's canvas and in Node through @napi-rs/canvas.
// Inline plugins (passed in the config's `plugins` array) are part of chart.js's public API
// (chart.js 4 documentation, "Plugins").

import type { Chart, Plugin } from 'chart.js';
import { INK, REFERENCE } from './palette.ts';

export type Reference =
  | { kind: 'line'; axis: 'x' | 'y'; value: number; label?: string; solid?: boolean }
  | { kind: 'band'; axis: 'x' | 'y'; from: number; to: number; label?: string };

function pixel(chart: Chart, axis: 'x' | 'y', value: number): number | undefined {
  const scale = chart.scales[axis];
  return scale ? scale.getPixelForValue(value) : undefined;
}

/** Reference lines (dashed gray) and bands (light gray, dashed edges) in data coordinates. */
export function referencePlugin(refs: readonly Reference[], fontFamily: string, fontSize: number): Plugin {
  return {
    id: 'fencelineReferences',
    beforeDatasetsDraw(chart) {
      const { ctx, chartArea: a } = chart;
      ctx.save();
      ctx.beginPath();
      ctx.rect(a.left, a.top, a.right - a.left, a.bottom - a.top);
      ctx.clip();
      for (const r of refs) {
        if (r.kind === 'band') {
          const p0 = pixel(chart, r.axis, r.from);
          const p1 = pixel(chart, r.axis, r.to);
          if (p0 === undefined || p1 === undefined) continue;
          ctx.fillStyle = REFERENCE.band;
          if (r.axis === 'x') ctx.fillRect(Math.min(p0, p1), a.top, Math.abs(p1 - p0), a.bottom - a.top);
          else ctx.fillRect(a.left, Math.min(p0, p1), a.right - a.left, Math.abs(p1 - p0));
          ctx.strokeStyle = REFERENCE.line;
          ctx.lineWidth = 1;
          ctx.setLineDash(REFERENCE.dash as unknown as number[]);
          for (const p of [p0, p1]) drawLine(ctx, r.axis, p, a);
        } else {
          const p = pixel(chart, r.axis, r.value);
          if (p === undefined) continue;
          ctx.strokeStyle = r.solid ? INK.text : REFERENCE.line;
          ctx.lineWidth = r.solid ? 1.5 : 1.25;
          ctx.setLineDash(r.solid ? [] : (REFERENCE.dash as unknown as number[]));
          drawLine(ctx, r.axis, p, a);
        }
        if (r.label) {
          ctx.setLineDash([]);
          ctx.fillStyle = INK.text;
          ctx.font = `${fontSize}px ${fontFamily}`;
          if (r.axis === 'x') {
            const p = r.kind === 'band' ? pixel(chart, 'x', r.to) : pixel(chart, 'x', r.value);
            if (p !== undefined) {
              ctx.textAlign = 'left';
              ctx.textBaseline = 'top';
              ctx.fillText(r.label, p + 4, a.top + 4);
            }
          } else {
            const p = r.kind === 'band' ? pixel(chart, 'y', r.to) : pixel(chart, 'y', r.value);
            if (p !== undefined) {
              ctx.textAlign = 'right';
              ctx.textBaseline = 'bottom';
              ctx.fillText(r.label, a.right - 4, p - 3);
            }
          }
        }
      }
      ctx.restore();
    },
  };
}

type Area = { left: number; right: number; top: number; bottom: number };
type Ctx = Chart['ctx'];

function drawLine(ctx: Ctx, axis: 'x' | 'y', p: number, a: Area): void {
  ctx.beginPath();
  if (axis === 'x') { ctx.moveTo(p, a.top); ctx.lineTo(p, a.bottom); } else { ctx.moveTo(a.left, p); ctx.lineTo(a.right, p); }
  ctx.stroke();
}

/** Vertical whiskers with caps at category positions (used for 95% intervals). */
export function whiskerPlugin(intervals: ReadonlyArray<{ index: number; low: number; high: number }>, color: string): Plugin {
  return {
    id: 'fencelineWhiskers',
    beforeDatasetsDraw(chart) {
      const x = chart.scales['x'];
      const y = chart.scales['y'];
      if (!x || !y) return;
      const { ctx } = chart;
      ctx.save();
      ctx.strokeStyle = color;
      ctx.lineWidth = 1.75;
      ctx.setLineDash([]);
      for (const iv of intervals) {
        const px = x.getPixelForValue(iv.index);
        const lo = y.getPixelForValue(iv.low);
        const hi = y.getPixelForValue(iv.high);
        ctx.beginPath();
        ctx.moveTo(px, lo); ctx.lineTo(px, hi);
        ctx.moveTo(px - 7, lo); ctx.lineTo(px + 7, lo);
        ctx.moveTo(px - 7, hi); ctx.lineTo(px + 7, hi);
        ctx.stroke();
      }
      ctx.restore();
    },
  };
}

export interface ShadedGrid {
  xEdges: readonly number[];
  yEdges: readonly number[];
  /** fill[iy][ix]: a CSS colour. */
  fill: ReadonlyArray<ReadonlyArray<string>>;
  /** hatch[iy][ix]: draw diagonal hatching and outline the region. */
  hatch: ReadonlyArray<ReadonlyArray<boolean>>;
  hatchColor: string;
  /**
   * texture[iy][ix]: a pattern on a fixed pixel lattice, so the offer probability is read from
   * shape as well as from lightness: 'dot' (offered always), 'plus' (offered sometimes), 'none'.
   */
  texture?: ReadonlyArray<ReadonlyArray<'dot' | 'plus' | 'none'>>;
  textureColor?: string;
  /** Count markers: circles centred in the cells of their own grid, area proportional to the count. */
  markers?: {
    xEdges: readonly number[];
    yEdges: readonly number[];
    values: ReadonlyArray<ReadonlyArray<number | null>>;
    fill: string;
    stroke: string;
  };
}

/** Filled grid cells, then hatching over marked cells and a dashed outline around the marked region. */
export function shadedGridPlugin(grid: ShadedGrid): Plugin {
  return {
    id: 'fencelineShadedGrid',
    beforeDatasetsDraw(chart) {
      const xs = chart.scales['x'];
      const ys = chart.scales['y'];
      if (!xs || !ys) return;
      const { ctx, chartArea: a } = chart;
      const px = grid.xEdges.map((v) => xs.getPixelForValue(v));
      const py = grid.yEdges.map((v) => ys.getPixelForValue(v));
      ctx.save();
      ctx.beginPath();
      ctx.rect(a.left, a.top, a.right - a.left, a.bottom - a.top);
      ctx.clip();
      for (let iy = 0; iy < py.length - 1; iy++) {
        for (let ix = 0; ix < px.length - 1; ix++) {
          const x0 = px[ix]!, x1 = px[ix + 1]!, y0 = py[iy]!, y1 = py[iy + 1]!;
          ctx.fillStyle = grid.fill[iy]?.[ix] ?? '#ffffff';
          // Overlap by half a pixel so no hairline gaps show between cells.
          ctx.fillRect(Math.min(x0, x1) - 0.25, Math.min(y0, y1) - 0.25, Math.abs(x1 - x0) + 0.5, Math.abs(y1 - y0) + 0.5);
        }
      }
      if (grid.texture) drawTexture(ctx, grid.texture, grid.textureColor ?? 'rgba(0, 50, 90, 0.75)', px, py);
      // Hatching: 45° lines on a fixed pixel lattice, clipped to each marked cell.
      ctx.strokeStyle = grid.hatchColor;
      ctx.lineWidth = 1;
      ctx.setLineDash([]);
      const spacing = 7;
      for (let iy = 0; iy < py.length - 1; iy++) {
        for (let ix = 0; ix < px.length - 1; ix++) {
          if (!grid.hatch[iy]?.[ix]) continue;
          const l = Math.min(px[ix]!, px[ix + 1]!), r = Math.max(px[ix]!, px[ix + 1]!);
          const t = Math.min(py[iy]!, py[iy + 1]!), b = Math.max(py[iy]!, py[iy + 1]!);
          ctx.save();
          ctx.beginPath();
          ctx.rect(l, t, r - l, b - t);
          ctx.clip();
          ctx.beginPath();
          const start = Math.floor((l + t) / spacing) * spacing;
          for (let k = start; k <= r + b; k += spacing) {
            ctx.moveTo(k - t, t);
            ctx.lineTo(k - b, b);
          }
          ctx.stroke();
          ctx.restore();
        }
      }
      // Outline: cell edges where a marked cell meets an unmarked one (or the grid's border).
      ctx.strokeStyle = INK.text;
      ctx.lineWidth = 1.5;
      ctx.setLineDash([5, 3]);
      ctx.beginPath();
      const marked = (iy: number, ix: number) => grid.hatch[iy]?.[ix] === true;
      for (let iy = 0; iy < py.length - 1; iy++) {
        for (let ix = 0; ix < px.length - 1; ix++) {
          if (!marked(iy, ix)) continue;
          if (!marked(iy, ix - 1)) { ctx.moveTo(px[ix]!, py[iy]!); ctx.lineTo(px[ix]!, py[iy + 1]!); }
          if (!marked(iy, ix + 1)) { ctx.moveTo(px[ix + 1]!, py[iy]!); ctx.lineTo(px[ix + 1]!, py[iy + 1]!); }
          if (!marked(iy - 1, ix)) { ctx.moveTo(px[ix]!, py[iy]!); ctx.lineTo(px[ix + 1]!, py[iy]!); }
          if (!marked(iy + 1, ix)) { ctx.moveTo(px[ix]!, py[iy + 1]!); ctx.lineTo(px[ix + 1]!, py[iy + 1]!); }
        }
      }
      ctx.stroke();
      if (grid.markers) drawMarkers(ctx, grid.markers, (v) => xs.getPixelForValue(v), (v) => ys.getPixelForValue(v));
      ctx.restore();
    },
  };
}

/** Dots or plus signs on a 9-pixel lattice (fixed in pixels, so neighbouring cells join seamlessly), clipped to each cell. */
function drawTexture(ctx: Ctx, texture: NonNullable<ShadedGrid['texture']>, color: string, px: number[], py: number[]): void {
  const step = 9;
  ctx.fillStyle = color;
  ctx.strokeStyle = color;
  ctx.lineWidth = 1.2;
  ctx.setLineDash([]);
  for (let iy = 0; iy < py.length - 1; iy++) {
    for (let ix = 0; ix < px.length - 1; ix++) {
      const kind = texture[iy]?.[ix] ?? 'none';
      if (kind === 'none') continue;
      const l = Math.min(px[ix]!, px[ix + 1]!), r = Math.max(px[ix]!, px[ix + 1]!);
      const t = Math.min(py[iy]!, py[iy + 1]!), b = Math.max(py[iy]!, py[iy + 1]!);
      ctx.save();
      ctx.beginPath();
      ctx.rect(l, t, r - l, b - t);
      ctx.clip();
      ctx.beginPath();
      for (let y = Math.floor(t / step) * step + step / 2; y < b + step; y += step) {
        for (let x = Math.floor(l / step) * step + step / 2; x < r + step; x += step) {
          if (kind === 'dot') { ctx.moveTo(x + 1.3, y); ctx.arc(x, y, 1.3, 0, Math.PI * 2); }
          else { ctx.moveTo(x - 2, y); ctx.lineTo(x + 2, y); ctx.moveTo(x, y - 2); ctx.lineTo(x, y + 2); }
        }
      }
      if (kind === 'dot') ctx.fill(); else ctx.stroke();
      ctx.restore();
    }
  }
}

function drawMarkers(ctx: Ctx, m: NonNullable<ShadedGrid['markers']>, px: (v: number) => number, py: (v: number) => number): void {
  const shown = m.values.flat().filter((v): v is number => v !== null && v > 0);
  if (!shown.length) return;
  const max = Math.max(...shown);
  ctx.setLineDash([]);
  ctx.lineWidth = 1.1;
  ctx.fillStyle = m.fill;
  ctx.strokeStyle = m.stroke;
  m.values.forEach((row, iy) => row.forEach((v, ix) => {
    if (v === null || v <= 0) return; // hidden (small) and empty bins stay blank
    const x0 = px(m.xEdges[ix]!), x1 = px(m.xEdges[ix + 1]!);
    const y0 = py(m.yEdges[iy]!), y1 = py(m.yEdges[iy + 1]!);
    // The largest count fills most of its cell; area ∝ count (radius ∝ √count).
    const rMax = 0.46 * Math.min(Math.abs(x1 - x0), Math.abs(y1 - y0));
    const r = Math.max(1.5, rMax * Math.sqrt(v / max));
    ctx.beginPath();
    ctx.arc((x0 + x1) / 2, (y0 + y1) / 2, r, 0, Math.PI * 2);
    ctx.fill();
    ctx.stroke();
  }));
}
