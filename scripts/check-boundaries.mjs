#!/usr/bin/env node
// Layer-boundary lint (docs/architecture.md, "Boundaries that must hold").
// The pure analysis folders are also type-checked under tsconfig.pure.json with "types": [],
// so Node globals fail there; this script catches what the compiler cannot:
//  - imports of Node built-ins, Electron, the store or the renderer from a pure folder, and
//    renderer imports from main/ other than the contract and the chart specs;
//  - the direction of every import between the folders of main/ (LAYERS below: each folder
//    names the folders it may import; anything else is a back-edge);
//  - import cycles between files (type-only imports included: a cycle of types is still a knot).
import { readFileSync, readdirSync, statSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';

// The checkout to check: this one, or the folder given (tests plant back-edges in a copy).
const root = process.argv[2] ? resolve(process.argv[2]) : resolve(dirname(fileURLToPath(import.meta.url)), '..');
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

// Who may import whom, by folder (the longest matching prefix decides a file's folder). The flow:
// rules → design → estimate → report → pipeline → api → host / cli / serve / electron, with data,
// store, studyfile and output used by the pipeline and importing nothing of design, estimate or
// report. contract holds types shared with the renderer (type-only imports of the pure layers).
const LOW = ['main/rules', 'main/contract'];
const LAYERS = {
  'main/rules': ['main/contract'],
  'main/contract': ['main/rules', 'main/design', 'main/estimate', 'main/report'],
  'main/output': ['main/contract', 'main/rules'],
  'main/design': [...LOW],
  'main/estimate': [...LOW, 'main/design'],
  'main/report': [...LOW, 'main/design', 'main/estimate', 'main/output'],
  'main/data': [...LOW],
  'main/store': [...LOW, 'package.json'],
  'main/studyfile': [...LOW, 'main/design'],
  'main/sample-data': [...LOW, 'main/design', 'main/data'],
  'main/resources.ts': [],
  'main/pipeline': [...LOW, 'main/design', 'main/estimate', 'main/report', 'main/data', 'main/store', 'main/studyfile', 'main/output'],
  'main/api': [...LOW, 'main/design', 'main/estimate', 'main/report', 'main/data', 'main/store', 'main/studyfile', 'main/output', 'main/pipeline', 'main/resources.ts'],
};
const TOP = [...LAYERS['main/api'], 'main/api', 'main/api.ts', 'main/host', 'main/cli', 'main/cli.ts', 'main/serve.ts', 'main/electron', 'electron.config.ts', 'package.json'];
for (const top of ['main/host', 'main/api.ts', 'main/cli', 'main/cli.ts', 'main/serve.ts', 'main/electron']) LAYERS[top] = TOP;
const folderOf = (p) => Object.keys(LAYERS).filter((d) => under(p, [d])).sort((a, b) => b.length - a.length)[0] ?? null;

const problems = [];
const graph = new Map(); // file → files it imports (relative imports inside main/)
for (const file of [...walk(join(root, 'main')), ...walk(join(root, 'app'))]) {
  const f = rel(file);
  const pure = under(f, PURE) && !under(f, PURE_EXCEPT);
  const inApp = under(f, ['app']);
  if (!pure && !inApp && !under(f, ['main'])) continue;
  for (const spec of importsOf(file)) {
    if (!pure && !inApp && !under(f, ['main'])) continue;
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
    if (under(f, ['main']) && under(target, ['main'])) {
      if (!graph.has(f)) graph.set(f, []);
      graph.get(f).push(target);
    }
    const from = folderOf(f);
    const to = folderOf(target) ?? target;
    if (from && from !== to && under(f, ['main']) && !LAYERS[from].some((d) => to === d || under(to, [d]))) {
      problems.push(`${f}: imports '${spec}' (${target}); ${from}/ may not import ${to} — the layers point one way (docs/architecture.md).`);
    }
    if (pure && under(target, PURE_MAY_NOT_REACH)) {
      problems.push(`${f}: imports '${spec}' (${target}); pure layers may not reach the store, data import, Electron, workers or the renderer.`);
    }
    if (inApp && under(target, ['main']) && !under(target, APP_MAY_REACH_IN_MAIN)) {
      problems.push(`${f}: imports '${spec}' (${target}); the renderer may import only main/contract (types) and main/report/charts.`);
    }
  }
}

// Cycles between files (Tarjan 1972, strongly connected components by depth-first search).
{
  let counter = 0;
  const index = new Map(), low = new Map(), onStack = new Set(), stack = [];
  const strong = (v) => {
    index.set(v, counter); low.set(v, counter); counter++;
    stack.push(v); onStack.add(v);
    for (const w of graph.get(v) ?? []) {
      if (!index.has(w)) { strong(w); low.set(v, Math.min(low.get(v), low.get(w))); }
      else if (onStack.has(w)) low.set(v, Math.min(low.get(v), index.get(w)));
    }
    if (low.get(v) === index.get(v)) {
      const component = [];
      let w;
      do { w = stack.pop(); onStack.delete(w); component.push(w); } while (w !== v);
      if (component.length > 1) problems.push(`import cycle: ${component.reverse().join(' → ')} → ${component[0]}; move what they share into a module both import.`);
    }
  };
  for (const v of graph.keys()) if (!index.has(v)) strong(v);
}

if (problems.length) {
  console.error(`Layer boundaries broken (${problems.length}):\n` + problems.map((p) => '  - ' + p).join('\n'));
  process.exit(1);
}
console.log('Layer boundaries hold.');
