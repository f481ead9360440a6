// The map's runs kept on disk in the workspace, for hosts that run each figure.map call on a
// fresh worker thread (worker-runner.ts), where a cache in memory does not outlive the call.
// One file per run under <workspace>/map-runs/: what a map needs (MapRun) and nothing more — the
// results as JSON, then the rule's input columns, the offers, and each delta's APS and crossing
// bits as raw little-endian arrays. The program is compiled again from the study (compiling is
// deterministic). These are per-unit values, like the unit file the workspace already stores;
// at most MAX_STORED_RUNS files are kept (the oldest used goes first), and a file that cannot
// be read is treated as absent and removed.

import { createHash, randomBytes } from 'node:crypto';
import { mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Results } from '../contract/results.ts';
import type { Study } from '../contract/study.ts';
import type { MapRun } from '../report/boundary-map.ts';
import { lowerValidatedProgram } from '../rules/compile.ts';

export const MAX_STORED_RUNS = 2;
const MAGIC = 'FENCELINE-MAP-RUN 1\n';

type ArrayKind = 'f64' | 'u32';
interface Header { key: string; n: number; results: Results; arrays: Array<{ name: string; kind: ArrayKind }> }

export const mapRunDir = (workspaceDir: string): string => join(workspaceDir, 'map-runs');
const fileOf = (dir: string, key: string) => join(dir, `${createHash('sha256').update(key).digest('hex').slice(0, 32)}.run`);

function arraysOf(run: MapRun): Array<{ name: string; kind: ArrayKind; data: Float64Array | Uint32Array }> {
  const { cols, z } = run.prepared;
  return [
    ...cols.continuous.map((data, j) => ({ name: `continuous.${j}`, kind: 'f64' as const, data })),
    ...cols.discrete.map((data, j) => ({ name: `discrete.${j}`, kind: 'f64' as const, data })),
    { name: 'z', kind: 'f64' as const, data: z },
    ...run.propensity.aps.map((data, k) => ({ name: `aps.${k}`, kind: 'f64' as const, data })),
    ...run.propensity.straddle.map((data, k) => ({ name: `straddle.${k}`, kind: 'u32' as const, data })),
  ];
}

/** Keep a run on disk (written to a temporary name, then renamed, so a reader never sees half a file). */
export function storeMapRun(workspaceDir: string, key: string, run: MapRun): void {
  const dir = mapRunDir(workspaceDir);
  mkdirSync(dir, { recursive: true });
  const arrays = arraysOf(run);
  const header: Header = { key, n: run.prepared.cols.n, results: run.results, arrays: arrays.map(({ name, kind }) => ({ name, kind })) };
  const head = Buffer.from(JSON.stringify(header), 'utf8');
  const size = Buffer.alloc(4);
  size.writeUInt32LE(head.length);
  const body = arrays.map((a) => Buffer.from(a.data.buffer, a.data.byteOffset, a.data.byteLength));
  const target = fileOf(dir, key);
  const temp = `${target}.${randomBytes(6).toString('hex')}.tmp`;
  writeFileSync(temp, Buffer.concat([Buffer.from(MAGIC, 'utf8'), size, head, ...body]));
  renameSync(temp, target);
  prune(dir);
}

/** A stored run for this key, or null. */
export function loadMapRun(workspaceDir: string, key: string, study: Study): MapRun | null {
  const file = fileOf(mapRunDir(workspaceDir), key);
  let bytes: Buffer;
  try { bytes = readFileSync(file); } catch { return null; }
  try {
    const magic = Buffer.byteLength(MAGIC);
    if (bytes.subarray(0, magic).toString('utf8') !== MAGIC) throw new Error('not a map run');
    const headLength = bytes.readUInt32LE(magic);
    const header = JSON.parse(bytes.subarray(magic + 4, magic + 4 + headLength).toString('utf8')) as Header;
    if (header.key !== key) return null;
    let at = magic + 4 + headLength;
    const read = new Map<string, Float64Array | Uint32Array>();
    for (const a of header.arrays) {
      const width = a.kind === 'f64' ? 8 : 4;
      const slice = bytes.subarray(at, at + header.n * width);
      if (slice.length !== header.n * width) throw new Error('truncated');
      // Copy into fresh, aligned memory.
      const copy = new Uint8Array(slice);
      read.set(a.name, a.kind === 'f64' ? new Float64Array(copy.buffer) : new Uint32Array(copy.buffer));
      at += slice.length;
    }
    const program = lowerValidatedProgram(study.program);
    const get = <T>(name: string) => { const v = read.get(name); if (!v) throw new Error(`missing ${name}`); return v as T; };
    const deltas = header.results.settings.deltas;
    const run: MapRun = {
      program,
      prepared: {
        cols: {
          n: header.n,
          continuous: program.continuous.map((_, j) => get<Float64Array>(`continuous.${j}`)),
          discrete: program.discrete.map((_, j) => get<Float64Array>(`discrete.${j}`)),
        },
        z: get<Float64Array>('z'),
      },
      propensity: {
        aps: deltas.map((_, k) => get<Float64Array>(`aps.${k}`)),
        straddle: deltas.map((_, k) => get<Uint32Array>(`straddle.${k}`)),
      },
      results: header.results,
    };
    const now = new Date();
    try { utimesSync(file, now, now); } catch { /* the order of eviction only */ }
    return run;
  } catch {
    rmSync(file, { force: true });
    return null;
  }
}

/** Keep the most recently used files only. */
function prune(dir: string): void {
  const files = readdirSync(dir)
    .filter((f) => f.endsWith('.run'))
    .map((f) => { const path = join(dir, f); try { return { path, used: statSync(path).mtimeMs }; } catch { return null; } })
    .filter((f): f is { path: string; used: number } => f !== null)
    .sort((a, b) => b.used - a.used);
  for (const f of files.slice(MAX_STORED_RUNS)) rmSync(f.path, { force: true });
}
