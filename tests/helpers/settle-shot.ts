// Waiting for a shot's pipeline to come to rest, for the API tests that drive it over HTTP.
import { expect } from 'vitest';
import { pollUntil, type PipelineClient } from '../../bench/lib/pipeline-client.ts';

/** The fields of GET /api/shots/:id that settleShot looks at. */
export interface SettlingShot {
  shot: { status: string };
  captures: { id: string; state: string }[];
  analyses: { id: string; state: string }[];
}

/** Polls the shot every 20 ms until no capture or analysis is queued or running; returns every state seen per id. */
export async function settleShot<T extends SettlingShot>(client: PipelineClient, shotId: string, timeoutMs = 60_000): Promise<{ shot: T; seen: Map<string, string[]> }> {
  const seen = new Map<string, string[]>();
  const note = (id: string, state: string) => {
    const list = seen.get(id) ?? [];
    if (list.at(-1) !== state) list.push(state);
    seen.set(id, list);
  };
  const shot = await pollUntil(async () => {
    const d = (await client.get<T>(`/api/shots/${shotId}`)).body;
    for (const c of d.captures) note(c.id, c.state);
    for (const a of d.analyses) note(a.id, a.state);
    // The shot's status is settled by the job after the row's state, so wait for it too.
    const busy = d.shot.status === 'processing' || d.captures.some((c) => c.state === 'queued' || c.state === 'reading') || d.analyses.some((a) => a.state === 'queued' || a.state === 'running');
    if (busy) return undefined;
    // A capture is marked ready in the same transaction as the shot's automatic version is made
    // (server/modules/shots/end-capture-read.ts), so a ready capture with no version is never a state to wait out.
    if (d.captures.some((c) => c.state === 'ready') && d.analyses.length === 0) {
      throw new Error(`shot ${shotId} has a ready capture and no analysis version (captures: ${d.captures.map((c) => c.state).join(', ')})`);
    }
    return d;
  }, { timeoutMs, intervalMs: 20, what: `shot ${shotId} to settle` });
  return { shot, seen };
}

/** States must only move forward along `order` (a state may be skipped between two looks, never revisited). */
export function expectForward(states: string[], order: string[]): void {
  const ranks = states.map((s) => order.indexOf(s));
  expect(ranks.every((r) => r >= 0), `unknown state in ${states.join(' → ')}`).toBe(true);
  for (let i = 1; i < ranks.length; i++) expect(ranks[i], states.join(' → ')).toBeGreaterThan(ranks[i - 1]);
}
