// The checks of a study's propensity settings (deltas, draws, seed), with a message for each
// problem; in a module of its own so that validating a study file (studyfile/validate.ts, on the
// way to `check`) loads none of the propensity stage.

import type { Checked } from '../rules/types.ts';
import type { ApsSettings } from './aps.ts';

export function validateSettings(settings: ApsSettings, basePath = 'settings'): Checked<ApsSettings> {
  const problems = [];
  if (!Array.isArray(settings.deltas) || settings.deltas.length === 0) {
    problems.push({ path: `${basePath}.deltas`, message: 'Give at least one delta (the neighbourhood radius in scaled units), for example [0.05, 0.1, 0.2].' });
  } else {
    settings.deltas.forEach((d, i) => {
      if (typeof d !== 'number' || !(d > 0) || !Number.isFinite(d)) {
        problems.push({ path: `${basePath}.deltas[${i}]`, message: `Each delta must be a positive number; ${JSON.stringify(d)} is not.` });
      }
    });
  }
  if (!Number.isInteger(settings.draws) || settings.draws < 32 || settings.draws > 1_000_000) {
    problems.push({ path: `${basePath}.draws`, message: 'draws must be a whole number from 32 to 1,000,000 (4,000 is a good default).' });
  }
  if (!Number.isInteger(settings.seed) || settings.seed < 0 || settings.seed > Number.MAX_SAFE_INTEGER) {
    problems.push({ path: `${basePath}.seed`, message: 'seed must be a whole number, 0 or more.' });
  }
  return problems.length ? { ok: false, problems } : { ok: true, value: settings };
}
