// What the Electron preload exposes on `window.fenceline` (the contract is in main/contract/bridge.ts).
export type { FencelineBridge, ShellEvent } from '../../main/contract/bridge.ts';
