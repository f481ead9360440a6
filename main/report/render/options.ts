// Options shared by the memo renderers.

export interface ChartSize {
  /** Layout size in CSS pixels. */
  width: number;
  height: number;
  /** Device pixels per CSS pixel in the PNG. */
  scale: number;
}

export const DEFAULT_CHART_SIZE: ChartSize = { width: 760, height: 440, scale: 2 };

export interface RenderOptions {
  chartSize?: ChartSize;
  /** Figures already rendered (figure id → PNG), so several formats can share one rendering. */
  figures?: ReadonlyMap<string, Buffer>;
}
