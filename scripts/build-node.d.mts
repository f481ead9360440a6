// Types of scripts/build-node.mjs (for the tests and the benchmark that start the bundles).
export const NODE_OUT_DIR: string;
export const NODE_ENTRIES: ReadonlyArray<{ entry: string; out: string }>;
export interface NodeBundleOptions {
  /** Where the bundles go (default: dist-node/ under the project root). */
  outDir?: string;
  /** Print errors only. */
  quiet?: boolean;
}
/** Whether the bundles were built from the files as they are now. */
export function bundlesAreFresh(options?: Pick<NodeBundleOptions, 'outDir'>): boolean;
/** Builds the bundles; resolves to the files written. */
export function buildNodeBundles(options?: NodeBundleOptions): Promise<string[]>;
/** Builds the bundles unless fresh; resolves to whether a build ran. */
export function ensureNodeBundles(options?: NodeBundleOptions): Promise<boolean>;
