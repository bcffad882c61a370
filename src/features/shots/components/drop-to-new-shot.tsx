import { useQueryClient } from '@tanstack/react-query';
import { useState, type DragEvent } from 'react';
import { useNavigate } from 'react-router-dom';
import { api } from '../../../lib/api-client.ts';
import { ErrorNote } from '../../../components/ui/primitives.tsx';
import { nextShotBody, type ShotSetUp } from '../../../../shared/contracts/shots.ts';
import { uploadCaptures } from '../api/captures.ts';

interface LatestShot { shots: ShotSetUp[] }

/**
 * Files dropped on a campaign log its next shot: numbered after the last one, with the last shot's projectile, rig,
 * seal and room conditions (to be corrected on the shot page), then uploaded; the page then opens the new shot.
 */
export function DropToNewShot({ labId, campaignId }: { labId: string; campaignId: string }) {
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const [over, setOver] = useState(false);
  const [status, setStatus] = useState<string | null>(null);
  const [error, setError] = useState<Error | null>(null);

  const onDrop = async (e: DragEvent) => {
    e.preventDefault();
    setOver(false);
    const files = [...e.dataTransfer.files];
    if (files.length === 0) return;
    setError(null);
    try {
      setStatus('Logging the next shot…');
      const latest = await api.get<LatestShot>(`/api/labs/${labId}/shots?campaignId=${campaignId}&limit=1&sort=number:desc`);
      const last = latest.shots[0];
      const { shot } = await api.post<{ shot: { id: string; number: number } }>(
        `/api/labs/${labId}/shots`,
        nextShotBody(campaignId, last, 'Logged by dropping files on the campaign; check the conditions.', new Date().toISOString()),
      );
      // All files in one request, so the shot's automatic analysis reads them together.
      const names = files.length === 1 ? files[0].name : `${files.length} files`;
      await uploadCaptures(shot.id, files, (fractions) => {
        const share = files.reduce((sum, f, i) => sum + f.size * fractions[i], 0) / Math.max(1, files.reduce((sum, f) => sum + f.size, 0));
        setStatus(`Shot #${shot.number}: sending ${names} (${Math.round(share * 100)} %)`);
      });
      void queryClient.invalidateQueries({ queryKey: ['labs', labId] });
      navigate(`/labs/${labId}/shots/${shot.id}`);
    } catch (err) {
      setError(err as Error);
      setStatus(null);
    }
  };

  return (
    <div
      onDragOver={(e) => { e.preventDefault(); setOver(true); }}
      onDragLeave={() => setOver(false)}
      onDrop={(e) => void onDrop(e)}
      data-testid="campaign-drop"
      className={`rounded-lg border-2 border-dashed px-5 py-3 text-sm transition-colors ${over ? 'border-signal-400 bg-signal-100/50' : 'border-harbour-200 text-harbour-600'}`}
    >
      <p role="status">{status ?? 'Just fired? Drop the scope files here to log the next shot with the last shot’s set-up.'}</p>
      {error && <div className="mt-2"><ErrorNote error={error} /></div>}
    </div>
  );
}
