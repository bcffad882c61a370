import { pino, type Logger } from 'pino';

export type { Logger };

/** Structured JSON logs on stdout; one logger per process, children per component. */
export function createLogger(level: string, name: string): Logger {
  return pino({
    name,
    level,
    redact: { paths: ['req.headers.authorization', 'req.headers.cookie', 'password', '*.password'], censor: '[hidden]' },
  });
}
