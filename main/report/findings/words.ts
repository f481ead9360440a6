// Numbers inside the findings' plain-words sentences (`because`, the cluster note): three
// significant digits, thousands grouped, as the screens print them.

export function plainNumber(v: number): string {
  if (!Number.isFinite(v)) return v > 0 ? 'infinity' : v < 0 ? 'minus infinity' : 'undefined';
  const rounded = Number(v.toPrecision(3));
  return rounded.toLocaleString('en-US', { maximumFractionDigits: 6 });
}

export function plainInterval(ci: readonly [number | null, number | null]): string {
  const lo = ci[0] === null ? 'minus infinity' : plainNumber(ci[0]);
  const hi = ci[1] === null ? 'infinity' : plainNumber(ci[1]);
  return `${lo} to ${hi}`;
}

export function listWords(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}
