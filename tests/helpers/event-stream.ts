// Reads a server-sent event stream (GET /api/labs/:labId/events) the way a lab script would: fetch with the
// caller's credential, frames parsed from the body as they arrive.

export interface StreamEvent { event: string; data: unknown }

export interface EventStreamReader {
  status: number;
  contentType: string | null;
  /** Every event received so far, in order. */
  events: StreamEvent[];
  /** Resolves with the first event (already received or to come) that satisfies `match`; rejects after `timeoutMs`. */
  waitFor(match: (e: StreamEvent) => boolean, timeoutMs?: number): Promise<StreamEvent>;
  /** Resolves when the server ends the stream (or it is closed here). */
  ended: Promise<void>;
  close(): void;
}

/** Opens the stream and resolves once the response headers are in (the body keeps being read). */
export async function openEventStream(url: string, headers: Record<string, string>): Promise<EventStreamReader> {
  const controller = new AbortController();
  const response = await fetch(url, { headers: { accept: 'text/event-stream', ...headers }, signal: controller.signal });
  const events: StreamEvent[] = [];
  const waiters: { match: (e: StreamEvent) => boolean; resolve: (e: StreamEvent) => void }[] = [];
  const push = (e: StreamEvent) => {
    events.push(e);
    for (const w of [...waiters]) if (w.match(e)) {
      waiters.splice(waiters.indexOf(w), 1);
      w.resolve(e);
    }
  };
  let markEnded: () => void = () => undefined;
  const ended = new Promise<void>((resolve) => { markEnded = resolve; });
  if (!response.ok || !response.body) markEnded();
  if (response.ok && response.body) {
    void (async () => {
      const decoder = new TextDecoder();
      let buffer = '';
      try {
        for await (const chunk of response.body as unknown as AsyncIterable<Uint8Array>) {
          buffer += decoder.decode(chunk, { stream: true });
          let end: number;
          while ((end = buffer.indexOf('\n\n')) >= 0) {
            const frame = buffer.slice(0, end);
            buffer = buffer.slice(end + 2);
            let event = 'message';
            const data: string[] = [];
            for (const line of frame.split('\n')) {
              if (line.startsWith('event: ')) event = line.slice(7);
              else if (line.startsWith('data: ')) data.push(line.slice(6));
            }
            if (data.length > 0) push({ event, data: JSON.parse(data.join('\n')) });
          }
        }
      } catch {
        // aborted by close()
      }
      markEnded();
    })();
  }
  return {
    status: response.status,
    contentType: response.headers.get('content-type'),
    events,
    waitFor(match, timeoutMs = 30_000) {
      const seen = events.find(match);
      if (seen) return Promise.resolve(seen);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`no matching event within ${timeoutMs} ms; got ${JSON.stringify(events)}`)), timeoutMs);
        waiters.push({ match, resolve: (e) => { clearTimeout(timer); resolve(e); } });
      });
    },
    ended,
    close: () => controller.abort(),
  };
}
