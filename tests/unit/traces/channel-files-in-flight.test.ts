// The registry a trace request waits on while a deep upload's channel files are still being written.
import { describe, expect, it } from 'vitest';
import { channelFilesWriting, channelFilesWritten } from '../../../server/traces/channel-files-in-flight.ts';

const tick = () => new Promise((resolve) => setTimeout(resolve, 5));

describe('channelFilesWritten', () => {
  it('When nothing is being written for a capture, then it resolves at once', async () => {
    let done = false;
    void channelFilesWritten('nothing-here').then(() => { done = true; });
    await tick();
    expect(done).toBe(true);
  });

  it('When the files are being written, then it waits until they are, and afterwards resolves at once', async () => {
    let finish!: () => void;
    channelFilesWriting('c1', new Promise<void>((resolve) => { finish = resolve; }));
    let done = false;
    void channelFilesWritten('c1').then(() => { done = true; });
    await tick();
    expect(done).toBe(false);
    finish();
    await tick();
    expect(done).toBe(true);
    let after = false;
    void channelFilesWritten('c1').then(() => { after = true; });
    await tick();
    expect(after).toBe(true);
  });

  it('When the writing fails, then the waiting request goes on (and finds the files missing), never rejected', async () => {
    let fail!: (err: Error) => void;
    channelFilesWriting('c2', new Promise<void>((_, reject) => { fail = reject; }));
    const waiting = channelFilesWritten('c2');
    fail(new Error('disk full'));
    await expect(waiting).resolves.toBeUndefined();
  });

  it('When a second write of the same capture starts before the first ends, then the waiting follows the second', async () => {
    let first!: () => void;
    let second!: () => void;
    channelFilesWriting('c3', new Promise<void>((resolve) => { first = resolve; }));
    channelFilesWriting('c3', new Promise<void>((resolve) => { second = resolve; }));
    let done = false;
    void channelFilesWritten('c3').then(() => { done = true; });
    first();
    await tick();
    expect(done).toBe(false);
    second();
    await tick();
    expect(done).toBe(true);
  });
});
