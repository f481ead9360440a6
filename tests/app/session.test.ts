// The app's session (app/lib/session.ts): what comes back from disk is checked before it is used,
// and the out-of-date words appear exactly when the open study's fingerprint differs from the run's.

import { describe, expect, it } from 'vitest';
import { outOfDateText, readSession, SESSION_VERSION } from '../../app/lib/session.ts';

const good = { version: SESSION_VERSION, draft: { title: 'T' }, baseDir: '/w', studyPath: null, fromSample: false, savedKey: '{}', step: 'rule', runId: 4, runJob: null };

describe('a saved session', () => {
  it('comes back as saved', () => {
    expect(readSession(good)).toEqual(good);
    expect(readSession({ ...good, draft: null, runId: null, runJob: 'a'.repeat(24) })).toMatchObject({ draft: null, runId: null, runJob: 'a'.repeat(24) });
  });
  it.each([
    ['nothing', null],
    ['another version', { ...good, version: 0 }],
    ['an unknown step', { ...good, step: 'settings' }],
    ['a run id that is not a whole number', { ...good, runId: 1.5 }],
    ['a draft that is a list', { ...good, draft: [] }],
    ['a path that is a number', { ...good, baseDir: 3 }],
  ])('is dropped when it holds %s', (_, value) => {
    expect(readSession(value)).toBeNull();
  });
});

describe('out of date', () => {
  it('says so, naming the run, only when the fingerprints differ', () => {
    expect(outOfDateText(7, 'a', 'b')).toBe('These results are out of date: the study changed since run 7.');
    expect(outOfDateText(7, 'a', 'a')).toBeNull();
    expect(outOfDateText(null, 'a', 'b')).toBeNull();
    expect(outOfDateText(7, 'a', null)).toBeNull(); // the open study is not valid yet: nothing to compare
    expect(outOfDateText(7, '', 'b')).toBeNull(); // a run recorded before fingerprints
  });
});
