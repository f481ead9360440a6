#!/usr/bin/env node
// Layer-boundary lint (docs/architecture.md, "Boundaries that must hold").
// The pure analysis folders are also type-checked under tsconfig.pure.json with "types": [],
// so Node globals fail there; this script catches what the compiler cannot: imports of
// Node built-ins, Electron, the store or the renderer from a pure folder, and renderer
// imports from main/ other than the contract and the chart specs.
import { readFileSync, readdirSync, statSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const builtins = new Set(builtinModules.flatMap((m) => [m, `node:${m}`]));
const forbiddenPackages = new Set(['electron', 'better-sqlite3', 'exceljs', 'pdfkit', 'docx', '@napi-rs/canvas', 'svelte']);

const PURE = ['main/rules', 'main/design', 'main/estimate', 'main/report/model', 'main/report/caveats', 'main/report/findings', 'main/contract', 'main/studyfile/validate'];
const PURE_EXCEPT = ['main/design/parallel'];
const PURE_MAY_NOT_REACH = ['main/store', 'main/data', 'main/electron', 'main/design/parallel', 'app', 'main/api.ts', 'main/pipeline', 'main/cli.ts', 'main/serve.ts'];
const APP_MAY_REACH_IN_MAIN = ['main/contract', 'main/report/charts'];

function* walk(dir) {
  let entries;
  try { entries = readdirSync(dir); } catch { return; }
  for (const name of entries) {
    if (name === 'node_modules' || name.startsWith('.')) continue;
    const p = join(dir, name);
    if (statSync(p).isDirectory()) yield* walk(p);
    else if (/\.(ts|mts|js|mjs|svelte)$/.test(name)) yield p;
  }
}

const importRe = /(?:^|[\s;])(?:import|export)\s[^'"`]*?from\s*['"]([^'"]+)['"]|(?:^|[\s;(])import\s*\(\s*['"]([^'"]+)['"]\s*\)|(?:^|[\s;])import\s+['"]([^'"]+)['"]|require\s*\(\s*['"]([^'"]+)['"]\s*\)/gm;

function importsOf(file) {
  const text = readFileSync(file, 'utf8').replace(/\/\*[\s\S]*?\*\//g, '').replace(/(^|[^:])\/\/.*$/gm, '$1');
  const out = [];
  for (const m of text.matchAll(importRe)) out.push(m[1] ?? m[2] ?? m[3] ?? m[4]);
  return out;
}

const rel = (p) => relative(root, p).split(sep).join('/');
const under = (p, dirs) => dirs.some((d) => p === d || p.startsWith(d + '/') || p.startsWith(d + '.'));

const problems = [];
for (const file of [...walk(join(root, 'main')), ...walk(join(root, 'app'))]) {
  const f = rel(file);
  const pure = under(f, PURE) && !under(f, PURE_EXCEPT);
  const inApp = under(f, ['app']);
  if (!pure && !inApp) continue;
  for (const spec of importsOf(file)) {
    const isRelative = spec.startsWith('.') || spec.startsWith('/');
    if (!isRelative) {
      const pkg = spec.startsWith('@') ? spec.split('/').slice(0, 2).join('/') : spec.split('/')[0];
      if (pure && (builtins.has(spec) || builtins.has(pkg) || forbiddenPackages.has(pkg))) {
        problems.push(`${f}: imports '${spec}'; the pure analysis layers take values and return values (no Node, Electron, database or document libraries).`);
      }
      if (inApp && builtins.has(spec)) problems.push(`${f}: the renderer imports Node built-in '${spec}'.`);
      continue;
    }
    const target = rel(resolve(dirname(file), spec));
    if (pure && under(target, PURE_MAY_NOT_REACH)) {
      problems.push(`${f}: imports '${spec}' (${target}); pure layers may not reach the store, data import, Electron, workers or the renderer.`);
    }
    if (inApp && under(target, ['main']) && !under(target, APP_MAY_REACH_IN_MAIN)) {
      problems.push(`${f}: imports '${spec}' (${target}); the renderer may import only main/contract (types) and main/report/charts.`);
    }
  }
}

if (problems.length) {
  console.error(`Layer boundaries broken (${problems.length}):\n` + problems.map((p) => '  - ' + p).join('\n'));
  process.exit(1);
}
console.log('Layer boundaries hold.');
