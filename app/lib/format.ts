// Numbers as the screens show them: grouped thousands, a sensible number of digits, a real
// minus sign, intervals in brackets. Pure.

/** 3 significant digits for small numbers, whole numbers with grouping for large ones. */
export function num(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  const abs = Math.abs(x);
  let s: string;
  if (abs >= 1000) s = Math.round(abs).toLocaleString('en-US');
  else if (abs === 0) s = '0';
  else if (abs >= 1) s = String(Number(abs.toFixed(Math.max(0, digits - 1 - Math.floor(Math.log10(abs))))));
  else if (abs >= 0.001) s = String(Number(abs.toPrecision(digits)));
  else s = abs.toExponential(1);
  return (x < 0 ? '−' : '') + s;
}

export const count = (n: number | null | undefined): string => (n === null || n === undefined ? '—' : Math.round(n).toLocaleString('en-US'));

export function percent(share: number | null | undefined, digits = 1): string {
  if (share === null || share === undefined || !Number.isFinite(share)) return '—';
  return `${(share * 100).toFixed(digits)}%`;
}

/** p-values: "< 0.001" below 0.001. */
export function pValue(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return '—';
  return p < 0.001 ? '< 0.001' : p.toFixed(3);
}

/** An interval; a null end is unbounded. */
export function interval(ci: readonly [number | null, number | null] | null | undefined): string {
  if (!ci) return '—';
  const [a, b] = ci;
  if (a === null && b === null) return 'every value (unbounded)';
  return `${a === null ? '−∞' : num(a)} to ${b === null ? '∞' : num(b)}`;
}
