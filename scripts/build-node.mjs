#!/usr/bin/env node
// The bundles that plain Node runs — the command line, browser mode's server and their worker
// threads — so that a start costs Node's own start plus the code it really needs, not a
// TypeScript transpile of every source (tsx) and every library loaded up front.
//
//   dist-node/cli.js, serve.js        `npm run cli`, `npm run serve` (through scripts/launch.mjs)
//   dist-node/worker.js, job-worker.js the propensity pool's and the job runner's threads, found
//                                      beside the bundle that starts them (pool.ts, worker-runner.ts)
//   dist-node/chunk-*.js               code reached only through import(): the memo renderers and
//                                      the libraries only they use (docx, exceljs, chart.js, and
//                                      the external pdfkit and @napi-rs/canvas), loaded on first use
//   dist-node/inputs.json              what the bundles were built from (see bundlesAreFresh)
//
// The folder sits one level below the project root, as dist/ does, so main/resources.ts and
// serve.ts find the sample programs and the renderer from the bundles as from the sources.
// Same esbuild settings as the desktop app's main and worker bundles (scripts/build-electron.mjs),
// with code splitting on so that an import() stays lazy (without it esbuild hoists the external
// imports of a lazily loaded module to the top of the bundle).
//
// `node scripts/build-node.mjs` builds (npm's `prepare` runs it after `npm install`/`npm ci`);
// `--if-stale` builds only when bundlesAreFresh says no. Plain Node: electron.config.ts is read
// through tsx's tsImport, only when building.
import { existsSync, mkdirSync, readFileSync, readdirSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

export const NODE_OUT_DIR = 'dist-node';
export const NODE_ENTRIES = [
  { entry: 'main/cli.ts', out: 'cli.js' },
  { entry: 'main/serve.ts', out: 'serve.js' },
  { entry: 'main/design/parallel/worker.ts', out: 'worker.js' },
  { entry: 'main/host/job-worker.ts', out: 'job-worker.js' },
];
const MANIFEST = 'inputs.json';
/** Files that shape the build without being bundled: a change to them rebuilds too. */
const BUILD_FILES = ['scripts/build-node.mjs', 'scripts/build-electron.mjs', 'electron.config.ts', 'package.json'];
/** Chunks no longer named by the current build are removed only after this long: a run started before a rebuild may still import them. */
const OLD_CHUNK_GRACE_MS = 24 * 3600 * 1000;

const statOf = (file) => { try { const s = statSync(file); return [s.mtimeMs, s.size]; } catch { return null; } };

/**
 * The file whose time and size stand for `input` in the manifest: a source file itself; for a file
 * of an installed library, the node_modules folder's .package-lock.json, which npm writes anew with
 * every install, upgrade or removal (npm ci builds the whole folder again) — one file instead of a
 * thousand. Without it (another package manager), the library's own package.json.
 */
function watchedFile(input) {
  const top = /^(.*?node_modules)\//.exec(input);
  if (!top) return input;
  if (existsSync(join(root, top[1], '.package-lock.json'))) return `${top[1]}/.package-lock.json`;
  return `${/^(.*node_modules\/(?:@[^/]+\/)?[^/]+)\//.exec(input)[1]}/package.json`;
}

/**
 * Whether the bundles in `outDir` were built from the files as they are now. The manifest lists
 * every source file esbuild read and what stands for the libraries it bundled (watchedFile), each
 * with its modification time and size at build time; the bundles are fresh when each is still
 * there with the same time and size and none was modified after the build began (an edit during
 * the build). About two hundred stat calls, a few milliseconds: no walk of main/ or app/, no
 * hashing. The exact inputs rather than "the newest file under main/ and app/", so that an edit
 * anywhere the bundles read counts (electron.config.ts, a library upgraded by npm install) and
 * one they do not read (app/, tests/) does not; time and size compared for equality, so that a
 * file put back with an older time (a copy that keeps times) counts too. A new file counts through
 * the edit that imports it; a library edited by hand in node_modules does not (npm run build:node).
 */
export function bundlesAreFresh({ outDir = join(root, NODE_OUT_DIR) } = {}) {
  let manifest;
  try { manifest = JSON.parse(readFileSync(join(outDir, MANIFEST), 'utf8')); } catch { return false; }
  if (manifest.root !== root) return false; // a copied or moved checkout
  for (const e of NODE_ENTRIES) if (!existsSync(join(outDir, e.out))) return false;
  for (const chunk of manifest.chunks ?? []) if (!existsSync(join(outDir, chunk))) return false;
  for (const [file, [mtime, size]] of Object.entries(manifest.inputs)) {
    const now = statOf(join(root, file));
    if (!now || now[0] !== mtime || now[1] !== size || mtime >= manifest.startedAt) return false;
  }
  return true;
}

/** Write `text` under a temporary name, then rename it into place: a reader sees the old file or the new one, never half of one. */
function writeAtomically(file, contents) {
  const tmp = `${file}.${process.pid}.tmp`;
  writeFileSync(tmp, contents);
  renameSync(tmp, file);
}

/**
 * Build the bundles into `outDir` (default dist-node/ under the project root). Concurrent builds
 * (two starts after the same edit) write the same files, each under a temporary name first.
 */
export async function buildNodeBundles({ outDir = join(root, NODE_OUT_DIR), quiet = false } = {}) {
  const [{ build }, { tsImport }] = await Promise.all([import('esbuild'), import('tsx/esm/api')]);
  const { esmBundleOptions, electronConfig: config } = await tsImport('./build-electron.mjs', import.meta.url);
  const startedAt = Date.now();
  const result = await build({
    ...esmBundleOptions(config.external),
    absWorkingDir: root,
    entryPoints: Object.fromEntries(NODE_ENTRIES.map((e) => [e.out.replace(/\.js$/, ''), join(root, e.entry)])),
    outdir: outDir,
    splitting: true,
    chunkNames: 'chunk-[hash]', // flat, so every file of the build sits one level below the root
    metafile: true,
    write: false,
    logLevel: quiet ? 'error' : 'warning',
  });
  mkdirSync(outDir, { recursive: true });
  const written = new Set();
  for (const f of result.outputFiles) {
    writeAtomically(f.path, f.contents);
    written.add(relative(outDir, f.path));
  }
  const inputs = {};
  for (const file of [...new Set([...Object.keys(result.metafile.inputs).map(watchedFile), ...BUILD_FILES])]) {
    const s = statOf(join(root, file));
    if (s) inputs[file] = s;
  }
  const entryOuts = new Set(NODE_ENTRIES.map((e) => e.out));
  const chunks = [...written].filter((f) => f.endsWith('.js') && !entryOuts.has(f));
  const entries = Object.fromEntries(Object.entries(result.metafile.outputs)
    .filter(([, o]) => o.entryPoint)
    .map(([out, o]) => [relative(outDir, join(root, out)), { static: o.imports.filter((i) => i.kind === 'import-statement').map((i) => i.path) }]));
  writeAtomically(join(outDir, MANIFEST), JSON.stringify({ root, startedAt, chunks, entries, inputs }, null, 1));
  // Chunks of older builds: kept a day for runs that started before this build, then removed.
  for (const name of readdirSync(outDir)) {
    if (written.has(name) || name === MANIFEST) continue;
    const full = join(outDir, name);
    const s = statOf(full);
    if (s && Date.now() - s[0] > OLD_CHUNK_GRACE_MS) rmSync(full, { force: true });
  }
  return [...written].map((f) => join(outDir, f));
}

/** Build unless fresh; resolves to whether a build ran. */
export async function ensureNodeBundles(options = {}) {
  if (bundlesAreFresh(options)) return false;
  await buildNodeBundles(options);
  return true;
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const ifStale = process.argv.includes('--if-stale');
  const prepare = process.argv.includes('--prepare');
  if (prepare && !existsSync(join(root, 'node_modules/esbuild')) ) {
    // npm install --omit=dev: no bundler, and no tsx either; say so instead of failing the install.
    console.error('fenceline: esbuild is not installed (development dependencies left out), so the command-line bundles were not built; npm run cli needs them.');
    process.exit(0);
  }
  try {
    const built = ifStale ? await ensureNodeBundles() : (await buildNodeBundles(), true);
    if (!ifStale || built) console.error(`fenceline: built ${NODE_OUT_DIR}/ (${NODE_ENTRIES.map((e) => e.out).join(', ')}) from the sources.`);
  } catch (e) {
    // esbuild has printed the source errors already; this line says what did not happen.
    console.error(`fenceline: the ${NODE_OUT_DIR}/ bundles could not be built${e instanceof Error && !e.message.startsWith('Build failed') ? ` (${e.message})` : ''}; see the messages above.`);
    process.exit(1);
  }
}
