#!/usr/bin/env node
// `npm run cli -- …` and `npm run serve -- …`: run the bundled command line or browser-mode
// server (dist-node/, scripts/build-node.mjs) in this process, rebuilding the bundles first when
// a file they were built from has changed since (or they are missing). The freshness check costs
// a few milliseconds; a rebuild about two seconds, with one line on stderr when it is a terminal.
// Usage: node scripts/launch.mjs <cli|serve> [arguments of the command]
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { NODE_ENTRIES, NODE_OUT_DIR, bundlesAreFresh } from './build-node.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const [name, ...args] = process.argv.slice(2);
const entry = NODE_ENTRIES.find((e) => e.out === `${name}.js` && (name === 'cli' || name === 'serve'));
if (!entry) {
  console.error('Usage: node scripts/launch.mjs <cli|serve> [arguments] (or npm run cli -- …, npm run serve)');
  process.exit(2);
}

if (!bundlesAreFresh()) {
  if (process.stderr.isTTY) process.stderr.write(`Building ${NODE_OUT_DIR}/ from the sources (once after each change)…\n`);
  // In a child process: the build loads esbuild and tsx, which this process then never carries.
  const r = spawnSync(process.execPath, [join(root, 'scripts/build-node.mjs'), '--if-stale'], { cwd: root, stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8' });
  if (r.status !== 0) {
    process.stderr.write(r.stderr || `fenceline: building ${NODE_OUT_DIR}/ stopped (${r.error?.message ?? `exit ${r.status ?? r.signal}`}).\n`);
    process.exit(1);
  }
}

const bundle = join(root, NODE_OUT_DIR, entry.out);
// The bundle sees the command line it would see if started directly (serve.js starts its server only then).
process.argv = [process.argv[0], bundle, ...args];
await import(pathToFileURL(bundle).href);
