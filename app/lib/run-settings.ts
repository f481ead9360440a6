// The Run screen's settings, checked as they are typed: ball radii (δ), simulation draws, seed.
// The limits are the engine's (main/design/propensity.ts validateSettings; the renderer may not
// import it, so tests/app/run-settings.test.ts holds the two to the same answers). Pure.

export interface SettingsText { deltas: string; draws: string; seed: string }
export interface SettingsCheck {
  ok: boolean;
  values: { deltas: number[]; draws: number; seed: number } | null;
  /** One message per field, in form words (empty when the field is fine). */
  messages: { deltas: string[]; draws: string[]; seed: string[] };
}

const WHOLE = /^[+-]?\d+$/;

function parseWhole(text: string): number | null {
  const t = text.trim().replace(/[,\s_]/g, '');
  return WHOLE.test(t) ? Number(t) : null;
}

export function checkSettingsText(t: SettingsText): SettingsCheck {
  const messages: SettingsCheck['messages'] = { deltas: [], draws: [], seed: [] };
  const parts = t.deltas.split(/[,;\s]+/).map((p) => p.trim()).filter((p) => p !== '');
  const deltas: number[] = [];
  if (parts.length === 0) messages.deltas.push('Give at least one radius, such as 0.05, 0.1, 0.2.');
  for (const p of parts) {
    const v = Number(p);
    if (!Number.isFinite(v)) messages.deltas.push(`“${p}” is not a number; separate radii with commas, such as 0.05, 0.1, 0.2.`);
    else if (!(v > 0)) messages.deltas.push(`${p} is not above 0: a radius is a distance, such as 0.1.`);
    else if (deltas.includes(v)) messages.deltas.push(`${p} is listed twice: keep one.`);
    else deltas.push(v);
  }
  const draws = parseWhole(t.draws);
  if (draws === null || draws < 32 || draws > 1_000_000) messages.draws.push('Type a whole number from 32 to 1,000,000 (4,000 is a good default).');
  const seed = parseWhole(t.seed);
  if (seed === null || seed < 0 || seed > Number.MAX_SAFE_INTEGER) messages.seed.push('Type a whole number, 0 or more (any: the same seed gives the same results).');
  const ok = messages.deltas.length + messages.draws.length + messages.seed.length === 0;
  return { ok, values: ok ? { deltas, draws: draws!, seed: seed! } : null, messages };
}
