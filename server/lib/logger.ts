import { pino, stdSerializers, type DestinationStream, type Logger } from 'pino';

export type { Logger };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
/** Path segments after these are secrets (an invitation link's token, a reset link's), unless they are record ids. */
const SECRET_AFTER = new Set(['invitations', 'password-resets', 'reset', 'tokens']);
const SECRET_QUERY = /^(token|secret|password|key|code|signature|sig)$/i;

/** Secrets recognised by their shape wherever they appear in a log line. */
const SECRET_PATTERNS: Array<[RegExp, string]> = [
  [/\$argon2(?:id|i|d)\$[^\s'",)]+/g, '[argon2 hash]'],
  [/\bgpt_[A-Za-z0-9_-]{8,}/g, 'gpt_[redacted]'],
  [/\beyJ[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+/g, '[jwt]'],
  [/(\w+:\/\/[^:/\s@]*:)[^@\s/]+@/g, '$1[redacted]@'], // a password inside a connection URL
  [/SCRAM-SHA-256\$[^\s'"]+/g, '[scram verifier]'],
];

/** A request URL with the secrets in its path and query replaced: `/api/invitations/[secret]/accept`. */
export function redactUrlSecrets(url: string): string {
  const [path, query] = url.split('?', 2);
  const parts = path.split('/');
  for (let i = 1; i < parts.length; i++) {
    if (SECRET_AFTER.has(parts[i - 1]) && parts[i] !== '' && !UUID.test(parts[i])) parts[i] = '[secret]';
  }
  let out = parts.join('/');
  if (query !== undefined) {
    out += `?${query.split('&').map((pair) => {
      const [key] = pair.split('=', 1);
      return SECRET_QUERY.test(decodeURIComponent(key)) ? `${key}=[secret]` : pair;
    }).join('&')}`;
  }
  return redactText(out);
}

function redactText(text: string): string {
  let out = text;
  for (const [pattern, replacement] of SECRET_PATTERNS) out = out.replace(pattern, replacement);
  return out;
}

/** SQL text with its string literals blanked: values a query carried inline stay out of the log. */
const redactSql = (sql: string): string => redactText(sql.replace(/'(?:[^']|'')*'/g, "'[value]'"));

/**
 * An error as pino writes it, minus what can carry secrets: a query's bound parameters, the values of failed
 * validations or constraints, and the literals of its SQL (a failed INSERT carried the argon2 hash).
 */
function safeError(err: unknown): unknown {
  if (!(err instanceof Error)) return redactDeep(err, 0);
  const serialized = stdSerializers.err(err) as unknown as Record<string, unknown>;
  for (const key of ['parameters', 'fields', 'value', 'bind']) delete serialized[key];
  for (const nested of ['original', 'parent']) {
    const inner = serialized[nested] as Record<string, unknown> | undefined;
    if (inner && typeof inner === 'object') {
      serialized[nested] = { message: inner.message, code: inner.code, detail: inner.detail };
    }
  }
  if (Array.isArray(serialized.errors)) {
    serialized.errors = (serialized.errors as Array<Record<string, unknown>>).map((e) => ({ message: e?.message, path: e?.path, type: e?.type }));
  }
  if (typeof serialized.sql === 'string') serialized.sql = redactSql(serialized.sql);
  return redactDeep(serialized, 0);
}

/** Every string in a log record, checked for the secret shapes above (depth-limited: logs are small). */
function redactDeep(value: unknown, depth: number): unknown {
  if (typeof value === 'string') return redactText(value);
  // Errors keep their class here: the `err` serializer (which pino runs after this) writes them safely.
  if (depth > 6 || value === null || typeof value !== 'object' || value instanceof Error) return value;
  if (Array.isArray(value)) return value.map((v) => redactDeep(v, depth + 1));
  const out: Record<string, unknown> = {};
  for (const [key, v] of Object.entries(value)) out[key] = key === 'sql' && typeof v === 'string' ? redactSql(v) : redactDeep(v, depth + 1);
  return out;
}

/**
 * Structured JSON logs on stdout; one logger per process, children per component. No secret reaches a log line
 * (issue 12, item 8): credentials by name (headers, passwords, tokens), request URLs by their secret segments,
 * errors without query parameters, and anything shaped like a password hash, API token, JWT or URL password.
 */
export function createLogger(level: string, name: string, destination?: DestinationStream): Logger {
  const options = {
    name,
    level,
    redact: {
      paths: [
        'req.headers.authorization', 'req.headers.cookie', 'headers.authorization', 'headers.cookie', 'headers["set-cookie"]',
        'password', '*.password', 'passwordHash', '*.passwordHash', 'token', '*.token', 'secret', '*.secret',
        'parameters', '*.parameters',
      ],
      censor: '[hidden]',
    },
    serializers: { err: safeError, url: (url: unknown) => (typeof url === 'string' ? redactUrlSecrets(url) : url) },
    formatters: { log: (object: Record<string, unknown>) => redactDeep(object, 0) as Record<string, unknown> },
  };
  return destination ? pino(options, destination) : pino(options);
}
