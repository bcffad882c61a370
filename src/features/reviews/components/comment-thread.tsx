import { useState, type FormEvent } from 'react';
import { Button, ErrorNote } from '../../../components/ui/primitives.tsx';
import { formatDateTime } from '../../../lib/format.ts';
import { useAddComment } from '../api/add-comment.ts';
import { useShotComments } from '../api/shot-comments.ts';
import type { ShotComment } from '../api/types.ts';

function CommentForm({ shotId, replyTo, onDone, label }: { shotId: string; replyTo?: string; onDone?: () => void; label: string }) {
  const add = useAddComment(shotId);
  const [body, setBody] = useState('');
  const submit = (e: FormEvent) => {
    e.preventDefault();
    add.mutate({ body, replyTo }, { onSuccess: () => { setBody(''); onDone?.(); } });
  };
  return (
    <form onSubmit={submit} className="space-y-1.5">
      <textarea
        aria-label={label}
        value={body}
        onChange={(e) => setBody(e.target.value)}
        rows={2}
        placeholder={replyTo ? 'Your answer' : 'A note on this shot for the team'}
        className="block w-full rounded-md border-0 bg-white px-2.5 py-1.5 text-xs ring-1 ring-harbour-200 focus:ring-2 focus:ring-harbour-600"
      />
      {add.isError && <ErrorNote error={add.error} />}
      <div className="flex gap-2">
        <Button type="submit" variant="secondary" className="!px-2.5 !py-1 text-xs" disabled={add.isPending || body.trim() === ''}>
          {replyTo ? 'Post answer' : 'Post comment'}
        </Button>
        {onDone && <Button variant="ghost" className="!px-2.5 !py-1 text-xs" onClick={onDone}>Cancel</Button>}
      </div>
    </form>
  );
}

function CommentItem({ comment, replies, shotId }: { comment: ShotComment; replies: ShotComment[]; shotId: string }) {
  const [answering, setAnswering] = useState(false);
  return (
    <li className="space-y-1.5">
      <div className="rounded-md bg-harbour-50 px-2.5 py-1.5 text-xs ring-1 ring-harbour-100">
        <p className="text-harbour-500"><span className="font-medium text-harbour-800">{comment.author?.name ?? 'A former member'}</span> · {formatDateTime(comment.createdAt)}</p>
        <p className="mt-0.5 whitespace-pre-wrap text-harbour-900">{comment.body}</p>
        {!answering && <button type="button" className="mt-0.5 text-harbour-600 underline-offset-2 hover:underline" onClick={() => setAnswering(true)}>Answer</button>}
      </div>
      {(replies.length > 0 || answering) && (
        <ul className="ml-4 space-y-1.5 border-l-2 border-harbour-100 pl-2.5">
          {replies.map((r) => (
            <li key={r.id} className="rounded-md bg-white px-2.5 py-1.5 text-xs ring-1 ring-harbour-100">
              <p className="text-harbour-500"><span className="font-medium text-harbour-800">{r.author?.name ?? 'A former member'}</span> · {formatDateTime(r.createdAt)}</p>
              <p className="mt-0.5 whitespace-pre-wrap text-harbour-900">{r.body}</p>
            </li>
          ))}
          {answering && <li><CommentForm shotId={shotId} replyTo={comment.id} onDone={() => setAnswering(false)} label={`Answer to ${comment.author?.name ?? 'comment'}`} /></li>}
        </ul>
      )}
    </li>
  );
}

/** The shot's comments: top-level notes with their answers indented beneath (one level; an answer to an answer joins its thread). */
export function CommentThread({ shotId }: { shotId: string }) {
  const q = useShotComments(shotId);
  const comments = q.data ?? [];
  const byId = new Map(comments.map((c) => [c.id, c]));
  const rootOf = (c: ShotComment): string => {
    let cur = c;
    for (let i = 0; i < 50 && cur.replyTo && byId.has(cur.replyTo); i++) cur = byId.get(cur.replyTo)!;
    return cur.id;
  };
  const roots = comments.filter((c) => !c.replyTo || !byId.has(c.replyTo));
  return (
    <div className="space-y-2">
      {q.isError && <ErrorNote error={q.error} />}
      {roots.length === 0 && q.isSuccess && <p className="text-xs text-harbour-500">No comments yet.</p>}
      <ul className="space-y-2" aria-label="Comments">
        {roots.map((c) => (
          <CommentItem key={c.id} comment={c} shotId={shotId} replies={comments.filter((r) => r.id !== c.id && r.replyTo && rootOf(r) === c.id)} />
        ))}
      </ul>
      <CommentForm shotId={shotId} label="New comment" />
    </div>
  );
}
