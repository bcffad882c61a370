// @vitest-environment happy-dom
// The bench display (full screen, outside the lab frame) listens to the lab's event stream: a `shot` notice for its
// campaign marks its feed query (benchKeys.feed) stale at once instead of waiting for the next one-second poll.
// The sign-in check and the display itself are stood in for, so only the route's wiring is under test.
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, cleanup, render } from '@testing-library/react';
import type { ReactNode } from 'react';
import { MemoryRouter, Route, Routes } from 'react-router-dom';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { benchKeys } from '../../../../src/features/bench/api/bench.ts';

vi.mock('../../../../src/app/require-auth.tsx', () => ({
  RequireAuth: ({ children }: { children: (me: unknown) => ReactNode }) =>
    children({ memberships: [{ labId: 'lab-1', labName: 'Hollowmere Ballistics Lab', role: 'experimenter' }] }),
}));
vi.mock('../../../../src/features/bench/components/bench-display.tsx', () => ({ BenchDisplay: () => <p>bench</p> }));

/** A stand-in EventSource that records what was opened and lets the test send events. */
class FakeEventSource {
  static opened: FakeEventSource[] = [];
  listeners = new Map<string, ((e: MessageEvent<string>) => void)[]>();
  closed = false;
  constructor(public url: string) { FakeEventSource.opened.push(this); }
  addEventListener(type: string, fn: (e: MessageEvent<string>) => void) { this.listeners.set(type, [...(this.listeners.get(type) ?? []), fn]); }
  close() { this.closed = true; }
  emit(type: string, data: unknown) { for (const fn of this.listeners.get(type) ?? []) fn({ data: JSON.stringify(data) } as MessageEvent<string>); }
}

beforeEach(() => {
  FakeEventSource.opened = [];
  vi.stubGlobal('EventSource', FakeEventSource);
});
afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

describe('the bench display and the lab event stream', () => {
  it('When a shot event for its campaign arrives, then the bench feed query is invalidated at once', async () => {
    const { Component } = await import('../../../../src/app/routes/lab-campaign-bench.tsx');
    const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    const feed = benchKeys.feed('lab-1', 'camp-1');
    const other = benchKeys.feed('lab-1', 'camp-2');
    client.setQueryData(feed, { campaign: { id: 'camp-1', name: 'Sweep' }, latest: null, recent: [] });
    client.setQueryData(other, { campaign: { id: 'camp-2', name: 'Seals' }, latest: null, recent: [] });
    render(
      <QueryClientProvider client={client}>
        <MemoryRouter initialEntries={['/labs/lab-1/campaigns/camp-1/bench']}>
          <Routes><Route path="/labs/:labId/campaigns/:campaignId/bench" element={<Component />} /></Routes>
        </MemoryRouter>
      </QueryClientProvider>,
    );
    expect(FakeEventSource.opened.map((s) => s.url)).toEqual(['/api/labs/lab-1/events']);
    expect(client.getQueryState(feed)?.isInvalidated).toBe(false);
    act(() => FakeEventSource.opened[0].emit('shot', { type: 'shot', shotId: 's-9', campaignId: 'camp-1', state: 'analysed', currentVersionId: 'v-1' }));
    expect(client.getQueryState(feed)?.isInvalidated).toBe(true);
    cleanup();
    expect(FakeEventSource.opened[0].closed).toBe(true);
  });
});
