// The content hash of a study: SHA-256 (FIPS 180-4) of its canonical JSON — keys sorted at every
// level, data paths resolved against the study's folder — so the same study saved in two places,
// or written with its keys in another order, has one fingerprint, and any change to the rule,
// the columns, the data files named or the settings gives another. A run stores the fingerprint
// of the study it ran; a screen compares it with the open study's to say "out of date".

import { createHash } from 'node:crypto';
import { isAbsolute, resolve } from 'node:path';
import type { Study } from '../contract/study.ts';

function canonical(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(canonical);
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(value as Record<string, unknown>).sort()) {
      const v = (value as Record<string, unknown>)[key];
      if (v !== undefined) out[key] = canonical(v);
    }
    return out;
  }
  return value;
}

/** The study with every file path it names made absolute (relative paths are relative to `baseDir`). */
export function withAbsolutePaths(study: Study, baseDir: string): Study {
  const at = (p: string) => (isAbsolute(p) ? p : resolve(baseDir, p));
  const t = study.columns.treatment;
  return {
    ...study,
    data: { ...study.data, path: at(study.data.path), ...(study.data.join ? { join: study.data.join.map((j) => ({ ...j, path: at(j.path) })) } : {}) },
    columns: { ...study.columns, ...(t !== undefined && typeof t !== 'string' ? { treatment: { ...t, listedIn: at(t.listedIn) } } : {}) },
  };
}

export function studyFingerprint(study: Study, baseDir: string): string {
  return createHash('sha256').update(JSON.stringify(canonical(withAbsolutePaths(study, baseDir)))).digest('hex');
}
