// The workspace file: open it, then use the typed repository methods on the Workspace.
export { openWorkspace } from './workspace.ts';
export { SCHEMA_VERSION } from './migrations.ts';
export type * from './types.ts';
