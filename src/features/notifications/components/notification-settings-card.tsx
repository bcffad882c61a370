import { useState } from 'react';
import { NOTIFICATION_KINDS, type NotificationKind } from '../../../../shared/contracts/review.ts';
import { Card, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { useNotificationPreferences, useUpdateNotificationPreferences } from '../api/notification-preferences.ts';

const KIND_TEXT: Record<NotificationKind, { label: string; hint: string }> = {
  reviewRequested: { label: 'A shot is sent for review', hint: 'To reviewers of the lab.' },
  approved: { label: 'My shot is signed off', hint: 'To whoever sent it for review.' },
  returned: { label: 'My shot is returned with a comment', hint: 'To whoever sent it for review.' },
  jobFailed: { label: 'Reading a file or an analysis failed', hint: 'For shots you uploaded or recomputed.' },
};

/** One switch per kind of e-mail; each change is saved at once. */
export function NotificationSettingsCard() {
  const q = useNotificationPreferences();
  const update = useUpdateNotificationPreferences();
  // The switch must move in the same event as the click (a controlled checkbox whose value arrives a tick later is
  // put back by React); it shows the server's answer again once the save has settled.
  const [moving, setMoving] = useState<Partial<Record<NotificationKind, boolean>>>({});
  const change = (kind: NotificationKind, on: boolean) => {
    setMoving((m) => ({ ...m, [kind]: on }));
    update.mutate({ [kind]: on }, {
      onSettled: () => setMoving((m) => {
        const { [kind]: _done, ...rest } = m;
        return rest;
      }),
    });
  };
  return (
    <Card title="E-mail notifications">
      {q.isPending && <Loading what="Loading your notification settings" />}
      {q.isError && <ErrorNote error={q.error} />}
      {q.data && (
        <fieldset className="space-y-3" disabled={update.isPending}>
          <legend className="sr-only">Send me an e-mail when</legend>
          <p className="text-sm text-harbour-600">Send me an e-mail when…</p>
          {NOTIFICATION_KINDS.map((kind) => (
            <label key={kind} className="flex items-start gap-3 text-sm">
              <input
                type="checkbox"
                className="mt-0.5 h-4 w-4 accent-harbour-700"
                checked={moving[kind] ?? q.data[kind]}
                onChange={(e) => change(kind, e.target.checked)}
              />
              <span>
                <span className="font-medium text-harbour-800">{KIND_TEXT[kind].label}</span>
                <span className="block text-xs text-harbour-500">{KIND_TEXT[kind].hint}</span>
              </span>
            </label>
          ))}
          {update.isError && <ErrorNote error={update.error} />}
          {update.isSuccess && <p role="status" className="text-xs text-harbour-500">Saved.</p>}
        </fieldset>
      )}
    </Card>
  );
}
