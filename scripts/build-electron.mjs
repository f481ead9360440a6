#!/usr/bin/env node
// npm run build:electron: the desktop app's bundles, as electron.config.ts names them.
//   main, workers  → dist/<out>.js, ES modules for Node (Electron's main process and worker
//                    threads); CommonJS dependencies get a real `require` through createRequire.
//   preload        → dist/preload.js, CommonJS: a sandboxed preload is not an ES module and
//                    may require nothing but `electron`.
//   renderer       → dist/renderer, built by `npm run build:app` (vite).
// Native modules and packages that read their own files stay outside the bundles
// (config.external) and are loaded from node_modules. Needs no Electron runtime.
// Run through tsx (it reads electron.config.ts): `node --import tsx scripts/build-electron.mjs [--no-renderer]`.
import { spawnSync } from 'node:child_process';
import { rmSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';
import config from '../electron.config.ts';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

// Names chosen not to collide with the bundled modules' own top-level names.
const ESM_BANNER = [
  "import { createRequire as __fencelineCreateRequire } from 'node:module';",
  'const require = __fencelineCreateRequire(import.meta.url);',
].join('\n');

/** esbuild settings of an ES-module bundle for Node (the main process, the workers; also scripts/build-node.mjs). */
export function esmBundleOptions(external = config.external) {
  return {
    bundle: true,
    platform: 'node',
    target: 'node20',
    format: 'esm',
    external,
    banner: { js: ESM_BANNER },
    // No source maps in what ships (they would hand out the sources, comments included); debug from the sources with tsx.
    sourcemap: false,
    legalComments: 'linked',
  };
}

export { config as electronConfig };

/** Build the bundles of electron.config.ts into `outDir` (default: config.outDir); the renderer too unless `renderer: false`. */
export async function buildElectron({ outDir = join(root, config.outDir), renderer = true, quiet = false } = {}) {
  const outputs = [];
  for (const e of config.entries) {
    if (e.target === 'renderer') continue;
    const outfile = join(outDir, e.out);
    const preload = e.target === 'preload';
    rmSync(`${outfile}.map`, { force: true }); // left by an older build that wrote maps
    await build({
      ...(preload
        ? { bundle: true, platform: 'node', target: 'node20', format: 'cjs', external: ['electron'], sourcemap: false, legalComments: 'linked' }
        : esmBundleOptions()),
      entryPoints: [join(root, e.entry)],
      outfile,
      logLevel: quiet ? 'error' : 'warning',
    });
    outputs.push(outfile);
  }
  if (renderer) {
    const vite = spawnSync(process.execPath, [join(root, 'node_modules/vite/bin/vite.js'), 'build', '--config', 'vite.config.ts', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
    if (vite.status !== 0) throw new Error('the renderer could not be built (npm run build:app); see the messages above');
    outputs.push(join(outDir, 'renderer', 'index.html'));
  }
  return outputs;
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const renderer = !process.argv.includes('--no-renderer');
  try {
    const outputs = await buildElectron({ renderer });
    for (const f of outputs) console.log(`built ${f.slice(root.length + 1)}`);
    console.log('Run it with the Electron runtime: npx electron dist/main.js (or npm start). Installers: see DEVELOPERS.md, "Packaging the desktop app".');
  } catch (e) {
    console.error(e instanceof Error ? e.message : e);
    process.exit(1);
  }
}
