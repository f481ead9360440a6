// Where poppler's tools are, and whether a test may skip without them. On a developer's machine a
// missing pdftotext/pdftoppm/pdfinfo skips the PDF read-back checks; under CI (.ci/run sets CI=1
// and installs poppler-utils) a missing tool fails the suite instead, so a fresh CI machine can
// never pass without reading a single PDF.

import { existsSync } from 'node:fs';

export type PopplerTool = 'pdftotext' | 'pdftoppm' | 'pdfinfo';

export const underCi = Boolean(process.env.CI) && process.env.CI !== '0' && process.env.CI !== 'false';

/** For it.runIf: true when the tool is there; under CI, true even when it is not, so the test runs and fails. */
export const canRun = (tool: PopplerTool): boolean => underCi || existsSync(`/usr/bin/${tool}`);
