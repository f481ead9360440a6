// Types of scripts/build-electron.mjs (for the tests that build the bundles).
export interface BuildElectronOptions {
  /** Where the bundles go (default: electron.config.ts's outDir under the project root). */
  outDir?: string;
  /** Also build the renderer with vite (default true). */
  renderer?: boolean;
  /** Print errors only. */
  quiet?: boolean;
}
/** Builds the bundles named in electron.config.ts; resolves to the files written. */
export function buildElectron(options?: BuildElectronOptions): Promise<string[]>;
