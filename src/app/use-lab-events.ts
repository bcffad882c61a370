import { useQueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import { benchKeys } from '../features/bench/api/bench.ts';
import { labKeys } from '../features/labs/api/members.ts';
import { shotKeys } from '../features/shots/api/shot.ts';

interface ShotEventData { shotId: string; campaignId: string; state: string; currentVersionId: string | null }

/**
 * Listens to the lab's event stream (GET /api/labs/:labId/events) while a lab page is open: a shot whose files,
 * versions or review changed is read again, and so are the lab's lists on screen. The stream only says what to
 * re-read, so a missed notice costs nothing but time: pages keep polling while work runs (shotQueryOptions), and
 * EventSource reconnects by itself after an outage, when everything shown is read again. The bench display (full
 * screen, outside the lab frame) mounts this too: a `shot` event re-reads that campaign's bench feed at once
 * (benchKeys.feed), and its one-second poll stays as the fallback.
 */
export function useLabEvents(labId: string | undefined): void {
  const queryClient = useQueryClient();
  useEffect(() => {
    if (!labId || typeof EventSource === 'undefined') return;
    const source = new EventSource(`/api/labs/${labId}/events`);
    let opened = false;
    source.addEventListener('ready', () => {
      // A reconnect: notices sent while the stream was down are lost, so re-read what is shown.
      if (opened) void queryClient.invalidateQueries({ queryKey: ['shots'] });
      opened = true;
    });
    source.addEventListener('shot', (e) => {
      const data = JSON.parse((e as MessageEvent<string>).data) as ShotEventData;
      void queryClient.invalidateQueries({ queryKey: shotKeys.detail(data.shotId), exact: true });
      void queryClient.invalidateQueries({ queryKey: benchKeys.feed(labId, data.campaignId), exact: true });
      void queryClient.invalidateQueries({ queryKey: labKeys.all(labId) });
    });
    return () => source.close();
  }, [labId, queryClient]);
}
