// The published JSON Schema of the study file agrees with the validator on the sample studies
// and on refusals the schema can express (JSON Schema draft 2020-12, checked with Ajv).
import Ajv2020 from 'ajv/dist/2020.js';
import { readdirSync, existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import programSchema from '../../main/rules/program.schema.json';
import studySchema from '../../main/studyfile/study.schema.json';
import { validateStudy } from '../../main/studyfile/validate.ts';

const ajv = new Ajv2020({ strict: true, allErrors: true });
ajv.addSchema(programSchema);
const validate = ajv.compile(studySchema);
const samplesDir = join(__dirname, '../../sample-programs');
const samples = readdirSync(samplesDir).map((d) => join(samplesDir, d, 'study.json')).filter(existsSync);

describe('study.schema.json', () => {
  it.each(samples)('accepts the sample %s, as the validator does', (path) => {
    const study = JSON.parse(readFileSync(path, 'utf8'));
    expect(validate(study), JSON.stringify(validate.errors)).toBe(true);
    if (typeof study.program === 'object') expect(validateStudy(study).ok).toBe(true);
  });
  it('refuses what the validator refuses structurally', () => {
    const base = JSON.parse(readFileSync(samples[0]!, 'utf8'));
    const broken = [
      { ...base, fenceline: 2 },
      { ...base, setings: {} },
      { ...base, columns: { ...base.columns, outcomes: [] } },
      { ...base, settings: { ...base.settings, draws: 3 } },
      { ...base, data: { sheet: 'x' } },
    ];
    for (const b of broken) {
      expect(validate(b)).toBe(false);
      expect(validateStudy(b).ok).toBe(false);
    }
  });
});
