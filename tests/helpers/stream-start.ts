// Routes that answer with a stream that stays open (GET /api/labs/:labId/events): supertest would wait for its end
// for ever. This parser resolves on the first chunk of a 200 answer (as { text }) and hangs up; an error answer ends
// by itself and is parsed as JSON as usual.
import type { Test } from 'supertest';
import type { RouteDef } from '../../server/lib/routes.ts';

export const isStreamRoute = (route: RouteDef) => route.response?.content?.type === 'text/event-stream';

export function readStreamStart(req: Test): Test {
  return req.buffer(true).parse((res, done) => {
    let text = '';
    let finished = false;
    const finish = (body: unknown) => {
      if (finished) return;
      finished = true;
      done(null, body);
    };
    res.on('data', (chunk: Buffer) => {
      text += chunk.toString('utf8');
      if ((res as unknown as { statusCode: number }).statusCode === 200) {
        finish({ text });
        (res as unknown as { destroy(): void }).destroy();
      }
    });
    res.on('end', () => {
      try {
        finish(JSON.parse(text) as unknown);
      } catch {
        finish({ text });
      }
    });
  });
}
