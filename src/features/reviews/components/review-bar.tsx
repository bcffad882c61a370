import { useState, type FormEvent, type ReactNode } from 'react';
import { Button, ErrorNote } from '../../../components/ui/primitives.tsx';
import { formatDateTime } from '../../../lib/format.ts';
import { useDecideReview } from '../api/decide-review.ts';
import { useRequestReview } from '../api/request-review.ts';
import { useReviewHistory } from '../api/review-history.ts';
import { CommentThread } from './comment-thread.tsx';
import { CompareWith } from './compare-with.tsx';
import { ReviewHistoryList } from './review-history-list.tsx';
import { ShotAuditList } from './shot-audit-list.tsx';

export interface ReviewBarProps {
  shotId: string;
  labId: string;
  /** shots.status: analysed, in_review, approved, returned, … */
  status: string;
  /** The current analysis version and whether it has finished. */
  current: { version: number; state: string } | null;
  canRequest: boolean;
  canDecide: boolean;
  /** Why the version under review cannot be approved yet (it is marked "check the time base"); null when it can. */
  approvalBlocked?: string | null;
  /** Admins and reviewers see the shot's audit trail. */
  canReadAudit?: boolean;
  /** Other shots of the campaign, to open beside this one in the comparison. */
  campaignShots?: { id: string; number: number }[];
  /** Shown under the bar (the launcher safety note). */
  children?: ReactNode;
}

const textareaClass = 'block w-full rounded-md border-0 bg-white px-2.5 py-1.5 text-sm ring-1 ring-harbour-200 focus:ring-2 focus:ring-harbour-600 aria-[invalid]:ring-red-400';

/**
 * A version marked "check the time base" may be sent (a reviewer can then return it, or sign it off once an analyst
 * has confirmed the read), but the sender is told plainly before and while sending: a warning, not a block.
 */
function TimeBaseSendWarning({ version }: { version: number | null }) {
  return (
    <p role="note" className="rounded-md bg-signal-100 px-3 py-2 text-xs text-signal-800 ring-1 ring-signal-400" data-testid="send-time-base-warning">
      <span className="font-semibold">{version != null ? `Version ${version}` : 'This version'} is marked “check the time base”.</span>{' '}
      A reviewer can return it but cannot sign it off until an analyst confirms the read (<em>I checked the time base</em>) or fixes it in a
      new version. Send it anyway only if you want the time base reviewed, and say so in the message.
    </p>
  );
}

function SendForReview({ shotId, labId, disabledReason, timeBaseFlagged, version }: { shotId: string; labId: string; disabledReason: string | null; timeBaseFlagged: boolean; version: number | null }) {
  const request = useRequestReview(shotId, labId);
  const [open, setOpen] = useState(false);
  const [message, setMessage] = useState('');
  if (!open) {
    return (
      <div className="space-y-1">
        <Button onClick={() => setOpen(true)} disabled={disabledReason != null}>Send for review{timeBaseFlagged ? '…' : ''}</Button>
        {disabledReason && <p className="text-xs text-harbour-500">{disabledReason}</p>}
        {!disabledReason && timeBaseFlagged && <p className="text-xs text-signal-800">Marked “check the time base”: it cannot be signed off until an analyst confirms the read.</p>}
      </div>
    );
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    request.mutate({ message: message.trim() || undefined }, { onSuccess: () => { setOpen(false); setMessage(''); } });
  };
  return (
    <form onSubmit={submit} className="space-y-2">
      {timeBaseFlagged && <TimeBaseSendWarning version={version} />}
      <label className="block text-xs font-medium text-harbour-800">
        Message to the reviewers <span className="font-normal text-harbour-500">(optional)</span>
        <textarea className={`mt-1 ${textareaClass}`} rows={2} value={message} onChange={(e) => setMessage(e.target.value)} placeholder="What to look at, what changed" />
      </label>
      {request.isError && <ErrorNote error={request.error} />}
      <div className="flex gap-2">
        <Button type="submit" disabled={request.isPending}>{request.isPending ? 'Sending…' : timeBaseFlagged ? 'Send anyway' : 'Send'}</Button>
        <Button variant="ghost" onClick={() => setOpen(false)}>Cancel</Button>
      </div>
    </form>
  );
}

function Decide({ shotId, labId, version, blocked }: { shotId: string; labId: string; version: number | null; blocked: string | null }) {
  const decide = useDecideReview(shotId, labId);
  const [returning, setReturning] = useState(false);
  const [comment, setComment] = useState('');
  const [missing, setMissing] = useState(false);
  const [confirming, setConfirming] = useState(false);
  const v = version != null ? `version ${version}` : 'this version';
  if (confirming) {
    return (
      <div className="space-y-2 rounded-md bg-emerald-50 px-3 py-2 ring-1 ring-emerald-200" role="group" aria-label="Confirm sign-off">
        <p className="text-sm text-emerald-900">
          Sign off {v}? Its numbers are frozen as the shot’s result: conditions and files can no longer change, and a later
          recomputation becomes a new version that needs its own review.
        </p>
        <div className="flex flex-wrap gap-2">
          <Button onClick={() => decide.mutate({ decision: 'approved', comment: comment.trim() || undefined }, { onSettled: () => setConfirming(false) })} disabled={decide.isPending}>
            Sign off {v}
          </Button>
          <Button variant="ghost" onClick={() => setConfirming(false)}>Cancel</Button>
        </div>
        {decide.isError && <ErrorNote error={decide.error} />}
      </div>
    );
  }
  if (!returning) {
    return (
      <div className="space-y-2">
        <div className="flex flex-wrap gap-2">
          <Button onClick={() => setConfirming(true)} disabled={decide.isPending || blocked != null}>
            Sign off {v}…
          </Button>
          <Button variant="danger" onClick={() => setReturning(true)} disabled={decide.isPending}>Return with comment</Button>
        </div>
        {blocked && <p className="text-xs text-signal-800" data-testid="approval-blocked">{blocked}</p>}
        {decide.isError && <ErrorNote error={decide.error} />}
      </div>
    );
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (comment.trim() === '') {
      setMissing(true);
      return;
    }
    decide.mutate({ decision: 'returned', comment: comment.trim() }, { onSuccess: () => { setReturning(false); setComment(''); } });
  };
  return (
    <form onSubmit={submit} className="space-y-2" noValidate>
      <label className="block text-xs font-medium text-harbour-800">
        What needs fixing <span className="font-normal text-red-700">(required)</span>
        <textarea
          className={`mt-1 ${textareaClass}`}
          rows={3}
          value={comment}
          aria-invalid={missing || undefined}
          onChange={(e) => { setComment(e.target.value); setMissing(false); }}
          placeholder="e.g. gate B's threshold sits in the ringing; use 40 %"
        />
      </label>
      {missing && <p role="alert" className="text-xs text-red-700">Say what needs fixing: a returned shot needs a comment.</p>}
      {decide.isError && <ErrorNote error={decide.error} />}
      <div className="flex gap-2">
        <Button type="submit" variant="danger" disabled={decide.isPending}>Return {v}</Button>
        <Button variant="ghost" onClick={() => { setReturning(false); setMissing(false); }}>Cancel</Button>
      </div>
    </form>
  );
}

/**
 * Review on the shot page: where the shot stands, the actions the role may take (send for review; approve or
 * return), the signed-off version, export links, and the history and comments underneath.
 */
export function ReviewBar(props: ReviewBarProps) {
  const { shotId, labId, status, current, canRequest, canDecide } = props;
  const history = useReviewHistory(shotId, status);
  const h = history.data;
  const entries = h?.history ?? [];
  const lastDecision = [...entries].reverse().find((e) => e.type === 'decision');
  const lastRequest = [...entries].reverse().find((e) => e.type === 'request');
  const reviewVersion = h?.reviewAnalysisId ? entries.find((e) => e.analysisId === h.reviewAnalysisId)?.analysisVersion ?? current?.version ?? null : current?.version ?? null;
  const approvedVersion = h?.approvedAnalysisVersion ?? null;

  const notReady = !current || current.state !== 'done'
    ? 'Available once an analysis has finished.'
    : status === 'processing' ? 'Wait for the recomputation to finish.' : null;

  let headline: ReactNode;
  if (status === 'approved') {
    headline = (
      <div className="rounded-md bg-emerald-50 px-3 py-2 ring-1 ring-emerald-200" data-testid="signed-off">
        <p className="text-sm font-semibold text-emerald-900">Signed off: version {approvedVersion ?? '?'}</p>
        {lastDecision?.type === 'decision' && lastDecision.decision === 'approved' && (
          <p className="text-xs text-emerald-800">by {lastDecision.by?.name ?? 'a former member'}, {formatDateTime(lastDecision.at)}. This version is frozen; a recomputation makes a new version that needs its own review.</p>
        )}
      </div>
    );
  } else if (status === 'in_review') {
    headline = (
      <p className="text-sm text-harbour-800">
        <span className="font-semibold">Version {reviewVersion ?? '?'} is waiting for review</span>
        {lastRequest && <span className="text-harbour-600"> · sent by {lastRequest.by?.name ?? 'a former member'}, {formatDateTime(lastRequest.at)}</span>}
      </p>
    );
  } else if (status === 'returned') {
    headline = (
      <div className="rounded-md bg-red-50 px-3 py-2 ring-1 ring-red-200">
        <p className="text-sm font-semibold text-red-900">Returned{lastDecision?.analysisVersion != null ? ` (version ${lastDecision.analysisVersion})` : ''}</p>
        {lastDecision?.type === 'decision' && lastDecision.comment && <p className="whitespace-pre-wrap text-xs text-red-800">“{lastDecision.comment}” — {lastDecision.by?.name ?? 'reviewer'}</p>}
      </div>
    );
  } else {
    headline = <p className="text-sm text-harbour-700">{current ? `Version ${current.version} not reviewed yet.` : 'No analysis yet.'}</p>;
  }
  const signedOffEarlier = status !== 'approved' && approvedVersion != null;

  return (
    <div className="w-full space-y-3 sm:w-[26rem]">
      <section aria-label="Review" className="space-y-3 rounded-lg bg-white px-4 py-3 shadow-sm ring-1 ring-harbour-100">
        <h2 className="text-xs font-semibold uppercase tracking-wide text-harbour-500">Review</h2>
        {headline}
        {signedOffEarlier && <p className="text-xs text-emerald-800">Version {approvedVersion} was signed off earlier; the current version is newer.</p>}
        {canRequest && (status === 'analysed' || status === 'returned') && <SendForReview shotId={shotId} labId={labId} disabledReason={notReady} timeBaseFlagged={props.approvalBlocked != null} version={current?.version ?? null} />}
        {canDecide && status === 'in_review' && <Decide shotId={shotId} labId={labId} version={reviewVersion} blocked={props.approvalBlocked ?? null} />}
        {history.isError && <ErrorNote error={history.error} />}
        <div className="flex flex-wrap items-center gap-x-3 gap-y-1 text-xs">
          <span className="text-harbour-500">Export</span>
          <a className="font-medium text-harbour-700 underline-offset-2 hover:underline" href={`/api/shots/${shotId}/export?format=csv`} download>CSV</a>
          <a className="font-medium text-harbour-700 underline-offset-2 hover:underline" href={`/api/shots/${shotId}/export?format=json`} download>JSON</a>
          <a className="font-medium text-harbour-700 underline-offset-2 hover:underline" href={`/api/shots/${shotId}/report.pdf`} target="_blank" rel="noreferrer">PDF report</a>
        </div>
        <CompareWith labId={labId} shotId={shotId} others={(props.campaignShots ?? []).filter((s) => s.id !== shotId)} />
        {props.canReadAudit && <ShotAuditList shotId={shotId} status={status} />}
        <details className="group text-sm" open={entries.length > 0}>
          <summary className="cursor-pointer text-xs font-medium text-harbour-700">History and comments</summary>
          <div className="mt-2 space-y-3">
            <ReviewHistoryList history={entries} />
            <div className="border-t border-harbour-100 pt-2">
              <CommentThread shotId={shotId} />
            </div>
          </div>
        </details>
      </section>
      {props.children}
    </div>
  );
}
