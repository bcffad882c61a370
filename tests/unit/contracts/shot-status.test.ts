// The one rule for a shot's status (shared/contracts/shot-status.ts), walked through every order in which a shot's
// files and versions can succeed or fail. The expected statuses are the product's review design (issue 7) and the
// "states that are always true" of issue 11, written out by hand.
import { describe, expect, it } from 'vitest';
import { deriveShotStatus, type ShotStatusInputs } from '../../../shared/contracts/shot-status.ts';

const shot = (over: Partial<ShotStatusInputs>): ShotStatusInputs => ({ captures: [], analyses: [], hasCurrentVersion: false, review: null, ...over });

describe('deriveShotStatus', () => {
  it('When a shot has no file, then it is awaiting files (draft)', () => {
    expect(deriveShotStatus(shot({}))).toBe('draft');
  });

  it('When a good file is read, then analysed, in every step of the order upload → read → version → done', () => {
    const steps: [Partial<ShotStatusInputs>, string][] = [
      [{ captures: ['queued'] }, 'processing'],
      [{ captures: ['reading'] }, 'processing'],
      [{ captures: ['ready'], analyses: ['queued'] }, 'processing'],
      [{ captures: ['ready'], analyses: ['running'] }, 'processing'],
      [{ captures: ['ready'], analyses: ['done'], hasCurrentVersion: true }, 'analysed'],
    ];
    for (const [inputs, expected] of steps) expect(deriveShotStatus(shot(inputs)), JSON.stringify(inputs)).toBe(expected);
  });

  it('When a file was read but its version was never made (a crash between the two), then failed, never processing for ever', () => {
    // The worker writes the status only after it made the version, so this is seen only after a crash; the worker's
    // sweep then makes the missing version.
    expect(deriveShotStatus(shot({ captures: ['ready'] }))).toBe('failed');
  });

  it('When a good file then a bad file are added, then the shot is analysed again once the bad one failed (a warning on the file)', () => {
    expect(deriveShotStatus(shot({ captures: ['ready', 'queued'], analyses: ['done'], hasCurrentVersion: true }))).toBe('processing');
    expect(deriveShotStatus(shot({ captures: ['ready', 'reading'], analyses: ['done'], hasCurrentVersion: true }))).toBe('processing');
    expect(deriveShotStatus(shot({ captures: ['ready', 'failed'], analyses: ['done'], hasCurrentVersion: true }))).toBe('analysed');
  });

  it('When a bad file then a good file are added, then failed first and analysed at the end', () => {
    expect(deriveShotStatus(shot({ captures: ['failed'] }))).toBe('failed');
    expect(deriveShotStatus(shot({ captures: ['failed', 'queued'] }))).toBe('processing');
    expect(deriveShotStatus(shot({ captures: ['failed', 'ready'], analyses: ['running'] }))).toBe('processing');
    expect(deriveShotStatus(shot({ captures: ['failed', 'ready'], analyses: ['done'], hasCurrentVersion: true }))).toBe('analysed');
  });

  it('When a recompute of an analysed shot fails (or its job gave up after an outage), then the shot is analysed, not processing', () => {
    expect(deriveShotStatus(shot({ captures: ['ready'], analyses: ['done', 'running'], hasCurrentVersion: true }))).toBe('processing');
    expect(deriveShotStatus(shot({ captures: ['ready'], analyses: ['done', 'failed'], hasCurrentVersion: true }))).toBe('analysed');
  });

  it('When the only version failed, then the shot failed; a later recompute that succeeds makes it analysed', () => {
    expect(deriveShotStatus(shot({ captures: ['ready'], analyses: ['failed'] }))).toBe('failed');
    expect(deriveShotStatus(shot({ captures: ['ready'], analyses: ['failed', 'queued'] }))).toBe('processing');
    expect(deriveShotStatus(shot({ captures: ['ready'], analyses: ['failed', 'done'], hasCurrentVersion: true }))).toBe('analysed');
  });

  it('When every file failed, then the shot failed', () => {
    expect(deriveShotStatus(shot({ captures: ['failed', 'failed'] }))).toBe('failed');
  });

  it('When the current version is in review, signed off or returned, then that stays shown while more work runs or after it failed', () => {
    for (const review of ['in_review', 'approved', 'returned'] as const) {
      expect(deriveShotStatus(shot({ captures: ['ready', 'queued'], analyses: ['done'], hasCurrentVersion: true, review }))).toBe(review);
      expect(deriveShotStatus(shot({ captures: ['ready'], analyses: ['done', 'running'], hasCurrentVersion: true, review }))).toBe(review);
      expect(deriveShotStatus(shot({ captures: ['ready'], analyses: ['done', 'failed'], hasCurrentVersion: true, review }))).toBe(review);
    }
  });

  it('When a file was removed and none is left, then awaiting files again', () => {
    // Removed files are left out of `captures` by the caller.
    expect(deriveShotStatus(shot({ captures: [], analyses: ['done'] }))).toBe('draft');
  });
});
