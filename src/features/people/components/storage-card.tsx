import { formatBytes } from '../../../../shared/units/format-bytes.ts';
import { Card, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { useLabStorage } from '../../labs/api/storage.ts';

/** What the lab's files take against its quota, and the limits on each upload (lab admins). */
export function StorageCard({ labId }: { labId: string }) {
  const query = useLabStorage(labId, true);
  return (
    <Card title="Storage">
      {query.isPending ? <Loading /> : query.isError ? <ErrorNote error={query.error} /> : <StorageUse data={query.data} />}
    </Card>
  );
}

function StorageUse({ data }: { data: NonNullable<ReturnType<typeof useLabStorage>['data']> }) {
  const { storage, limits } = data;
  const share = storage.quotaBytes ? Math.min(1, storage.usedBytes / storage.quotaBytes) : null;
  return (
    <div className="space-y-3 text-sm">
      <p>
        <span className="font-medium">{formatBytes(storage.usedBytes)}</span>
        {storage.quotaBytes ? <> of {formatBytes(storage.quotaBytes)} used</> : <> used (no quota)</>}
        <span className="text-harbour-500"> — scope files {formatBytes(storage.rawBytes)}, channels read from them {formatBytes(storage.channelBytes)}</span>
      </p>
      {share !== null && (
        <div
          role="meter" aria-label="Storage used" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(share * 100)}
          className="h-2 overflow-hidden rounded-full bg-harbour-100"
        >
          <div className={`h-full ${share > 0.9 ? 'bg-red-600' : 'bg-harbour-600'}`} style={{ width: `${Math.max(share * 100, 0.5)}%` }} />
        </div>
      )}
      <p className="text-harbour-500">
        Each upload: at most {formatBytes(limits.requestBytes)} in all and {formatBytes(limits.fileBytes)} a file; each file at most{' '}
        {limits.channelsPerCapture} channels of {limits.samplesPerChannel.toLocaleString('en-US')} samples. Set by the installation.
      </p>
    </div>
  );
}
