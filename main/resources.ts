// Folders shipped beside the code. This module sits one level below the project root, as the
// bundles of the desktop app do (dist/main.js, dist/job-worker.js: esbuild gives every bundled
// module the bundle's own import.meta.url), so the same relative address works from the sources
// and from the bundles — and, in a packaged app, inside app.asar.

import { fileURLToPath } from 'node:url';

/** The invented sample programs (one folder each, with its study file). */
export const SAMPLES_DIR = fileURLToPath(new URL('../sample-programs/', import.meta.url));
