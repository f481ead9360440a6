#!/usr/bin/env node
// Packaging step: flip Electron's fuses in a packaged app's binary (the fuse wire is read by
// Electron at start-up, before any of our code runs), so the shipped app cannot be turned into a
// general-purpose Node runtime or debugged by whoever can start it:
//   RunAsNode off                              — ELECTRON_RUN_AS_NODE=1 would run any script as Node
//   EnableNodeOptionsEnvironmentVariable off   — NODE_OPTIONS could preload code (--require)
//   EnableNodeCliInspectArguments off          — --inspect would open a debugger on the main process
//   EnableEmbeddedAsarIntegrityValidation on   — app.asar is checked against the hash built into the binary
//   OnlyLoadAppFromAsar on                     — no app/ folder beside app.asar is loaded instead
//   EnableCookieEncryption on, GrantFileProtocolExtraPrivileges off (the app uses its own scheme),
//   LoadBrowserProcessSpecificV8Snapshot off (Electron's default).
// Every fuse is set explicitly (strictlyRequireAllFuses), so an Electron with a new fuse stops the
// build until someone decides about it. Needs a packaged Electron binary, which our build machines
// cannot download: run it on the packaging machine (DEVELOPERS.md, "Packaging the desktop app").
//
//   node scripts/electron-fuses.mjs <path to the packaged app's executable, or the .app on macOS>
import { resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { flipFuses, FuseV1Options, FuseVersion, getCurrentFuseWire } from '@electron/fuses';

/** The fuse settings of the shipped app (FuseV1Options index → on/off). */
export function fuseConfig(platform = process.platform) {
  return {
    version: FuseVersion.V1,
    strictlyRequireAllFuses: true,
    // On Apple silicon a changed binary must be signed again; the ad-hoc signature is reset for the real one to follow.
    resetAdHocDarwinSignature: platform === 'darwin',
    [FuseV1Options.RunAsNode]: false,
    [FuseV1Options.EnableCookieEncryption]: true,
    [FuseV1Options.EnableNodeOptionsEnvironmentVariable]: false,
    [FuseV1Options.EnableNodeCliInspectArguments]: false,
    [FuseV1Options.EnableEmbeddedAsarIntegrityValidation]: true,
    [FuseV1Options.OnlyLoadAppFromAsar]: true,
    [FuseV1Options.LoadBrowserProcessSpecificV8Snapshot]: false,
    [FuseV1Options.GrantFileProtocolExtraPrivileges]: false,
  };
}

/** Flip the fuses of `binary`, then read them back; throws if any fuse did not take. */
export async function applyFuses(binary, platform = process.platform) {
  const config = fuseConfig(platform);
  await flipFuses(binary, config);
  const wire = await getCurrentFuseWire(binary);
  const wrong = Object.values(FuseV1Options)
    .filter((i) => typeof i === 'number' && wire[i] !== undefined)
    .filter((i) => (wire[i] === 49) !== config[i]);
  if (wrong.length) throw new Error(`fuses not set as asked: ${wrong.map((i) => FuseV1Options[i]).join(', ')}`);
  return wire;
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const binary = process.argv[2];
  if (!binary) {
    console.error('Usage: node scripts/electron-fuses.mjs <path to the packaged app\'s executable (or the .app on macOS)>');
    process.exit(2);
  }
  try {
    await applyFuses(resolve(binary));
    console.log(`Fuses set in ${binary}: RunAsNode, NODE_OPTIONS and --inspect off; asar integrity and asar-only loading on.`);
  } catch (e) {
    console.error(e instanceof Error ? e.message : e);
    process.exit(1);
  }
}
