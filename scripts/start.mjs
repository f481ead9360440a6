#!/usr/bin/env node
// `npm start`: open the desktop app (dist/main.js, built by npm run build:electron) when the
// Electron runtime is installed; otherwise say so and fall back to browser mode (the same
// renderer served on 127.0.0.1).
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { spawn } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const require = createRequire(import.meta.url);

function electronBinary() {
  try {
    const path = require('electron'); // the package exports the path of its downloaded binary
    return typeof path === 'string' && existsSync(path) ? path : null;
  } catch {
    return null;
  }
}

const serveEntry = join(root, 'main/serve.ts');
const electronMain = join(root, 'dist/main.js');
const binary = electronBinary();

const launchElectron = () => spawn(binary, [electronMain, ...process.argv.slice(2)], { stdio: 'inherit', cwd: root }).on('exit', (code) => process.exit(code ?? 0));

if (binary) {
  // The desktop app runs from its bundles (npm run build:electron); build them first when they are missing.
  if (existsSync(electronMain) && existsSync(join(root, 'dist/renderer/index.html'))) launchElectron();
  else {
    console.error('Building the desktop app first (npm run build:electron)…');
    spawn(process.execPath, ['--import', 'tsx', join(root, 'scripts/build-electron.mjs')], { stdio: ['ignore', 'ignore', 'inherit'], cwd: root })
      .on('exit', (code) => { if (code === 0) launchElectron(); else { console.error('The desktop app could not be built; see the messages above.'); process.exit(code ?? 1); } });
  }
} else if (existsSync(serveEntry)) {
  console.error('The Electron runtime is not installed on this machine, so Fenceline opens in browser mode instead.');
  // As npm run serve starts it: the bundled server (dist-node/serve.js), rebuilt first if out of date.
  const serve = () => spawn(process.execPath, [join(root, 'scripts/launch.mjs'), 'serve', ...process.argv.slice(2)], { stdio: 'inherit', cwd: root })
    .on('exit', (code) => process.exit(code ?? 0));
  if (existsSync(join(root, 'dist/renderer/index.html'))) serve();
  else {
    console.error('Building the screens first (npm run build:app)…');
    const vite = join(root, 'node_modules/vite/bin/vite.js');
    spawn(process.execPath, [vite, 'build', '--config', 'vite.config.ts', '--logLevel', 'warn'], { stdio: ['ignore', 'ignore', 'inherit'], cwd: root })
      .on('exit', (code) => { if (code === 0) serve(); else { console.error('The screens could not be built; see the messages above.'); process.exit(code ?? 1); } });
  }
} else {
  console.error(
    'The desktop app and browser mode are not built in this version of Fenceline yet.\n' +
    'Use the command line instead, for example:\n' +
    '  npm run --silent cli -- evaluate sample-programs/winter-credit/study.json --out out/winter-credit',
  );
  process.exit(1);
}
