// Build description of the desktop app: which entry points are bundled for which process.
// This file is the single place that names the entries, so the build script
// (scripts/build-electron.mjs), the packaged app and browser mode agree on them. Plain data,
// type-checked with the rest of the project.

export interface BuildEntry {
  /** Source file, relative to the project root. */
  entry: string;
  /** Output file, relative to `outDir`. */
  out: string;
  /** Where it runs: Electron's main process, the preload (sandboxed), a worker thread, or the renderer. */
  target: 'main' | 'preload' | 'worker' | 'renderer';
}

export interface ElectronBuildConfig {
  appId: string;
  productName: string;
  outDir: string;
  entries: BuildEntry[];
  /** Native modules that must be rebuilt against Electron's Node ABI when packaging. */
  nativeModules: string[];
  /**
   * Packages left out of the bundles and loaded from node_modules at run time: Electron itself,
   * native modules, and packages that read their own files at run time.
   */
  external: string[];
  /** Content-Security-Policy of the renderer: no remote content, no eval. */
  contentSecurityPolicy: string;
}

const config: ElectronBuildConfig = {
  appId: 'org.fenceline.desktop',
  productName: 'Fenceline',
  outDir: 'dist',
  entries: [
    { entry: 'main/electron/main.ts', out: 'main.js', target: 'main' },
    { entry: 'main/electron/preload.ts', out: 'preload.js', target: 'preload' },
    // The propensity pool (main/design/parallel/pool.ts) and the job runner (main/host/worker-runner.ts)
    // look for these beside the bundle that starts them.
    { entry: 'main/design/parallel/worker.ts', out: 'worker.js', target: 'worker' },
    { entry: 'main/host/job-worker.ts', out: 'job-worker.js', target: 'worker' },
    { entry: 'app/index.html', out: 'renderer/index.html', target: 'renderer' },
  ],
  nativeModules: ['better-sqlite3'],
  // pdfkit loads its standard fonts through its own package.json "imports" map, which only works from its own folder.
  external: ['electron', 'better-sqlite3', '@napi-rs/canvas', 'pdfkit', '@duckdb/node-api', '@duckdb/node-bindings'],
  contentSecurityPolicy: "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self' data:; font-src 'self'; connect-src 'self'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'",
};

export default config;
