// The packaging step's fuses (scripts/electron-fuses.mjs), on a stand-in binary: Electron's fuse
// wire is a sentinel string, a version byte, a length byte and one byte per fuse ('0' off, '1'
// on), as @electron/fuses reads and writes it. Electron itself cannot be downloaded on our build
// machines, so the real binary is flipped on the packaging machine with the same function.

import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
// @ts-expect-error a plain ES module script without types
import { applyFuses, fuseConfig } from '../../scripts/electron-fuses.mjs';

const SENTINEL = 'dL7pKGdnNz796PbbjQWNKmHXBZaB9tsX';

function fakeElectron(): string {
  const path = join(mkdtempSync(join(tmpdir(), 'fenceline-fuses-')), 'electron');
  // Electron's defaults: RunAsNode, cookie encryption off, NODE_OPTIONS and --inspect on, integrity and asar-only off.
  writeFileSync(path, Buffer.concat([Buffer.from('ELF…code…'), Buffer.from(SENTINEL), Buffer.from([1, 8]), Buffer.from('10110000'), Buffer.from('…more code')]));
  return path;
}

describe('the fuses of the packaged app', () => {
  it('turn off running as Node, NODE_OPTIONS and --inspect, and turn on asar integrity and asar-only loading', () => {
    const c = fuseConfig('linux');
    expect(c).toMatchObject({ strictlyRequireAllFuses: true, 0: false, 1: true, 2: false, 3: false, 4: true, 5: true, 6: false, 7: false });
    expect(fuseConfig('darwin').resetAdHocDarwinSignature).toBe(true);
  });
  it('are written into the binary\'s fuse wire and read back', async () => {
    const bin = fakeElectron();
    await applyFuses(bin, 'linux');
    const bytes = readFileSync(bin);
    const at = bytes.indexOf(SENTINEL) + SENTINEL.length;
    expect(bytes.subarray(at + 2, at + 10).toString()).toBe('01001100');
    expect(bytes.subarray(0, 10).toString()).toBe(Buffer.from('ELF…code…').subarray(0, 10).toString());
  });
});
