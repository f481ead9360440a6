// Colours, dashes and point shapes that stay apart in grayscale and for colour-blind readers:
// the Okabe & Ito palette (Okabe, M. and Ito, K. 2008, "Color Universal Design (CUD): how to make
// figures and presentations that are friendly to colorblind people", J*FLY; reprinted in Wong, B.
// 2011, "Points of view: Color blindness", Nature Methods 8:441), and never colour alone:
// each series also has its own dash pattern and point shape.

export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

export interface SeriesStyle {
  color: string;
  /** Canvas line dash ([] = solid). */
  dash: number[];
  /** chart.js point style. */
  point: 'circle' | 'triangle' | 'rect' | 'rectRot' | 'crossRot' | 'star';
}

/** Series in order: dark blue solid circles, vermillion dashed triangles, … (dark first for grayscale contrast). */
export const SERIES: readonly SeriesStyle[] = [
  { color: OKABE_ITO.blue, dash: [], point: 'circle' },
  { color: OKABE_ITO.vermillion, dash: [8, 4], point: 'triangle' },
  { color: OKABE_ITO.black, dash: [2, 3], point: 'rect' },
  { color: OKABE_ITO.bluishGreen, dash: [12, 3, 2, 3], point: 'rectRot' },
  { color: OKABE_ITO.reddishPurple, dash: [4, 2], point: 'crossRot' },
  { color: OKABE_ITO.orange, dash: [1, 2], point: 'star' },
];

export function seriesStyle(i: number): SeriesStyle {
  return SERIES[i % SERIES.length]!;
}

/** The two sides of an edge: below (not offered) and above (offered). */
export const SIDE_STYLE = { below: SERIES[0]!, above: SERIES[1]! } as const;

/** Reference lines and bands: gray, dashed, so they never look like data. */
export const REFERENCE = { line: '#555555', dash: [6, 4], band: 'rgba(0, 0, 0, 0.10)' } as const;

/** Text and grid colours. */
export const INK = { text: '#1a1a1a', grid: '#d9d9d9', axis: '#777777' } as const;

/**
 * Offer probability 0 → 1 as a single-hue ramp from white to the palette's sky blue: its lightness
 * falls steadily (gray 100% → about 62%), so it reads the same in grayscale, and dark overlays
 * (band hatching, count markers) stay visible on it.
 */
export function probabilityFill(p: number): string {
  const t = Math.min(1, Math.max(0, Number.isFinite(p) ? p : 0));
  const from = [255, 255, 255];
  const to = [0x56, 0xb4, 0xe9];
  const mix = (k: number) => Math.round(from[k]! + (to[k]! - from[k]!) * t);
  return `rgb(${mix(0)}, ${mix(1)}, ${mix(2)})`;
}
