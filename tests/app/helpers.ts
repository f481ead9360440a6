// The winter-credit sample study, read once for the app's tests (its rule is stated in
// sample-programs/winter-credit/README.md).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Study } from '../../main/contract/study.ts';

export const SAMPLE_DIR = join(import.meta.dirname, '..', '..', 'sample-programs', 'winter-credit');
export const sampleStudy = (): Study => JSON.parse(readFileSync(join(SAMPLE_DIR, 'study.json'), 'utf8')) as Study;
